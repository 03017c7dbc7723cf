/** RFC 4180 field quoting, and a leading quote on values a spreadsheet would run as a formula (OWASP CSV injection). */
export function csvField(value: unknown): string {
  let s = value == null ? '' : String(value);
  if (/^[=+\-@\t\r]/.test(s)) s = `'${s}`;
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s;
}

/** One CSV record of `columns` taken from `row`, CRLF-terminated (RFC 4180). */
export function csvLine(row: Record<string, unknown>, columns: readonly string[]): string {
  return `${columns.map((c) => csvField(row[c])).join(',')}\r\n`;
}
