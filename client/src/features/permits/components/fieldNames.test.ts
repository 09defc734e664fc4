import { describe, expect, it } from 'vitest';
import { ApiError } from '@client/lib/api';
import { permitErrorSummary, permitFieldLabel } from './fieldNames';

describe('permit field names in words', () => {
  it('names loads by their place in the list and other fields by their label', () => {
    expect(permitFieldLabel('loads[0].pressure')).toBe('Load 1, pressure');
    expect(permitFieldLabel('loads[2].unitWeight')).toBe('Load 3, unit weight');
    expect(permitFieldLabel('loads[1]')).toBe('Load 2');
    expect(permitFieldLabel('excavationIds')).toBe('Excavations');
  });

  it('puts the server message first, then each field as a sentence', () => {
    const e = new ApiError(400, 'invalid', 'Please correct the request.', { 'loads[0].pressure': 'must be more than 0 kPa', excavationIds: 'also name PIT-01' });
    expect(permitErrorSummary(e)).toBe('Please correct the request. Load 1, pressure must be more than 0 kPa. Also name PIT-01.');
  });
});
