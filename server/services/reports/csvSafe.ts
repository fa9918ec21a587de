/**
 * CSV for spreadsheets that other people open: a text cell that begins with = + - @, a tab or
 * a carriage return would be read as a formula (CSV injection, OWASP), so it gets a leading
 * apostrophe. Numbers are written as numbers: a number cannot carry a formula.
 */
export function neutralise(v: unknown): string {
  if (v == null) return ''
  if (typeof v === 'number' || typeof v === 'boolean') return String(v)
  const s = String(v)
  return /^[=+\-@\t\r]/.test(s) ? `'${s}` : s
}

/** RFC 4180 quoting after neutralising. */
function field(v: unknown): string {
  const s = neutralise(v)
  return /[",\r\n]/.test(s) ? `"${s.replace(/"/g, '""')}"` : s
}

export function safeCsv(columns: readonly string[], rows: Record<string, unknown>[]): string {
  const lines = [columns.map(field).join(',')]
  for (const row of rows) lines.push(columns.map((c) => field(row[c])).join(','))
  return lines.join('\r\n') + '\r\n'
}
