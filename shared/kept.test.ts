import { describe, expect, it } from 'vitest';
import { contentKey, frozen, Kept } from './kept';

describe('contentKey', () => {
  it('tells apart the values JSON writes alike (NaN, ±Infinity and null; −0 and 0; undefined and absent)', () => {
    // JSON.stringify writes NaN and ±Infinity as null, −0 as 0, and leaves an undefined property out (ECMA-262, JSON.stringify).
    const keys = [{ a: NaN }, { a: Infinity }, { a: -Infinity }, { a: null }, { a: -0 }, { a: 0 }, { a: undefined }, {}].map(contentKey);
    expect(new Set(keys).size).toBe(keys.length);
    expect(contentKey({ a: [1.5, 'x'] })).toBe(contentKey({ a: [1.5, 'x'] }));
  });
});

describe('Kept', () => {
  it('forgets the least recently used entry first, and makes a value only when none is kept', () => {
    const kept = new Kept<number>(2);
    let made = 0;
    kept.keep('a', () => ++made);
    kept.keep('b', () => ++made);
    expect(kept.keep('a', () => ++made)).toBe(1); // a used again: b is now the oldest
    kept.set('c', 9);
    expect([kept.get('a'), kept.get('b'), kept.get('c')]).toEqual([1, undefined, 9]);
    expect(made).toBe(2);
  });

  it('keeps frozen values that no caller can change', () => {
    const v = frozen({ soil: [{ top: 0 }] });
    expect(() => {
      (v.soil[0] as { top: number }).top = 1;
    }).toThrow(TypeError);
  });
});
