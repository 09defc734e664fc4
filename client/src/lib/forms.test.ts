import { describe, expect, it } from 'vitest';
import { ApiError } from './api';
import { applyServerErrors, fieldSentence } from './forms';

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

describe('applyServerErrors', () => {
  it('puts list items the server names as a[0].b on the form field a.0.b, and the rest in the summary', () => {
    const set: Record<string, string | undefined> = {};
    const setError = ((name: string, e: { message?: string }) => {
      set[name] = e.message;
    }) as Parameters<typeof applyServerErrors>[1];
    const error = new ApiError(400, 'invalid', 'Please correct the request.', { 'soil[1].top': 'repeats the top of soil[0] (0 m)', depth: 'must be greater than 0 m', geometry: 'must not cross itself' });
    const summary = applyServerErrors(error, setError, ['soil', 'depth'], { geometry: 'The shape' });
    expect(set).toEqual({ 'soil.1.top': 'repeats the top of soil[0] (0 m)', depth: 'must be greater than 0 m' });
    expect(summary).toBe('Please correct the request. The shape must not cross itself.');
  });
});
