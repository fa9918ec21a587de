/**
 * The one way Ferrolane writes a CSV cell, for every download (reports, the audit trail).
 *
 * A spreadsheet runs a cell that begins with = + - @, a tab or a carriage return as a formula
 * (OWASP "CSV Injection"): text that came from a user (an operation's name, an e-mail typed at
 * sign-in) could then fetch a URL or run a command on the reader's machine. Such text gets a
 * leading apostrophe, which spreadsheets show as plain text. Numbers are left alone: a number
 * cannot carry a formula, and a negative figure must stay a number.
 */
const FORMULA_START = /^[=+\-@\t\r]/

export function neutraliseCell(v: unknown): string {
  if (v == null) return ''
  if (typeof v === 'number' || typeof v === 'bigint' || typeof v === 'boolean') return String(v)
  const s = typeof v === 'object' ? JSON.stringify(v) : String(v)
  return FORMULA_START.test(s) ? `'${s}` : s
}

/** RFC 4180 on top: quote a field that holds a comma, quote or line break; double inner quotes. */
export function csvField(v: unknown): string {
  const s = neutraliseCell(v)
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

/** Header and rows as CSV text (CRLF line ends, as RFC 4180 asks). */
export function toCsv(columns: readonly string[], rows: readonly Record<string, unknown>[]): string {
  const lines = [columns.map(csvField).join(',')]
  for (const row of rows) lines.push(columns.map((c) => csvField(row[c])).join(','))
  return lines.join('\r\n') + '\r\n'
}
