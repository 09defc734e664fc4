/**
 * A new idempotency key: 128 random bits as 32 hex digits. Made with getRandomValues, which every
 * browser offers also on plain http (randomUUID needs a secure context).
 */
export function newIdempotencyKey(): string {
  const bytes = crypto.getRandomValues(new Uint8Array(16));
  return Array.from(bytes, (b) => b.toString(16).padStart(2, '0')).join('');
}
