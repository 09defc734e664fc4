import { describe, expect, it } from 'vitest';
import { z } from 'zod';
import { newIdempotencyKey, newUuid } from './random';

describe('random keys', () => {
  it('makes UUIDs the server accepts (RFC 9562 version 4 layout), each different', () => {
    const ids = Array.from({ length: 50 }, newUuid);
    for (const id of ids) {
      expect(z.uuid().safeParse(id).success).toBe(true);
      expect(id[14]).toBe('4');
    }
    expect(new Set(ids).size).toBe(50);
  });

  it('makes 32-hex-digit idempotency keys', () => {
    expect(newIdempotencyKey()).toMatch(/^[0-9a-f]{32}$/);
  });
});
