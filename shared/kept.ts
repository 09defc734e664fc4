/**
 * Results kept by the content of what they were made from: a prepared outline, a request found
 * valid, the fixed part of an engine check. Keyed by content, never by object, so something changed in
 * place is worked out again; bounded, the least recently used going first.
 */

/**
 * A key that tells apart every value a check reads: JSON, except that NaN, ±Infinity, −0 and an
 * undefined property (which JSON writes as null, 0 or leaves out) each keep a key of their own.
 */
export function contentKey(value: unknown): string {
  return plain(value) ? JSON.stringify(value) : JSON.stringify(value, keyOf);
}
/** Whether JSON writes the value as it is (the usual case; a replacer makes JSON.stringify several times slower). */
function plain(v: unknown): boolean {
  if (typeof v === 'number') return Number.isFinite(v) && !Object.is(v, -0);
  if (v === undefined) return false;
  if (typeof v !== 'object' || v === null) return true;
  if (Array.isArray(v)) {
    for (let i = 0; i < v.length; i++) if (!plain(v[i])) return false;
    return true;
  }
  for (const k in v) if (Object.hasOwn(v, k) && !plain((v as Record<string, unknown>)[k])) return false;
  return true;
}
function keyOf(_: string, v: unknown): unknown {
  if (typeof v === 'number') return Number.isFinite(v) && !Object.is(v, -0) ? v : `\u0000${Object.is(v, -0) ? '-0' : v}`;
  return v === undefined ? '\u0000undefined' : v;
}

/** A bounded map that forgets its least recently used entry first. */
export class Kept<V> {
  private readonly entries = new Map<string, V>();
  constructor(private readonly limit: number) {}

  get(key: string): V | undefined {
    const v = this.entries.get(key);
    if (v !== undefined) {
      this.entries.delete(key);
      this.entries.set(key, v);
    }
    return v;
  }

  set(key: string, value: V): void {
    this.entries.delete(key);
    if (this.entries.size >= this.limit) this.entries.delete(this.entries.keys().next().value!);
    this.entries.set(key, value);
  }

  /** The kept value for `key`, made (and kept) when there is none. */
  keep(key: string, make: () => V): V {
    let v = this.get(key);
    if (v === undefined) {
      v = make();
      this.set(key, v);
    }
    return v;
  }
}

/** Freezes a kept value and everything in it (typed arrays excepted: they cannot be frozen), so no caller changes what others get. */
export function frozen<T>(value: T): T {
  if (typeof value === 'object' && value !== null && !ArrayBuffer.isView(value) && !Object.isFrozen(value)) {
    for (const v of Object.values(value)) frozen(v);
    Object.freeze(value);
  }
  return value;
}
