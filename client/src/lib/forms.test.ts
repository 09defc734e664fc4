import { describe, expect, it } from 'vitest';
import { fieldSentence } from './forms';

describe('fieldSentence', () => {
  it('joins a reason that reads on from the label', () => {
    expect(fieldSentence('E-mail', 'is required')).toBe('E-mail is required.');
    expect(fieldSentence('Minimum edge clearance (m)', 'must be at most 10 m')).toBe('Minimum edge clearance (m) must be at most 10 m.');
  });

  it('shows any other reason as a sentence of its own', () => {
    expect(fieldSentence('Role', 'give both a site and a role, or neither')).toBe('Give both a site and a role, or neither.');
    expect(fieldSentence('Password', 'Too short.')).toBe('Too short.');
  });
});
