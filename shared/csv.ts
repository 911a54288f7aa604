// CSV lines (RFC 4180: comma-separated, CRLF, fields quoted when they hold a comma, quote or line
// break). Text that a spreadsheet would run as a formula is prefixed with an apostrophe (OWASP,
// "CSV Injection").

/** One CSV field from a value (null and undefined become an empty field). */
export function csvField(value: string | number | boolean | null | undefined, text = false): string {
  if (value === null || value === undefined) return ''
  let s = typeof value === 'number' ? (Number.isFinite(value) ? String(value) : '') : String(value)
  if (text && /^[=+\-@\t\r]/.test(s)) s = `'${s}`
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

/** One CSV record, CRLF-terminated. */
export function csvLine(fields: string[]): string {
  return `${fields.join(',')}\r\n`
}
