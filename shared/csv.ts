/**
 * CSV (RFC 4180): fields joined by commas, rows by CRLF; a field with a comma, quote or line break is
 * quoted and its quotes doubled. Text that a spreadsheet would run as a formula (starting with =, +,
 * -, @, tab or CR) is prefixed with an apostrophe; numbers are written as they are; null and
 * undefined are empty.
 */
function csvCell(v: unknown): string {
  if (v === null || v === undefined) return '';
  if (typeof v === 'number') return String(v);
  const s = String(v);
  const safe = /^[=+\-@\t\r]/.test(s) ? `'${s}` : s;
  return /[",\r\n]/.test(safe) ? `"${safe.replace(/"/g, '""')}"` : safe;
}

/** Rows (the first usually the header) as one CSV text, ending with CRLF. */
export function toCsv(rows: readonly (readonly unknown[])[]): string {
  return rows.map((r) => r.map(csvCell).join(',')).join('\r\n') + '\r\n';
}
