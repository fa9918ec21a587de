import { isApiError } from '@/api/client'

/** Bytes as people read a size limit: "20 MB", "1.4 MB". */
export function mb(bytes: number): string {
  const v = bytes / 1024 / 1024
  return `${v >= 10 || Number.isInteger(v) ? Math.round(v) : v.toFixed(1)} MB`
}

/**
 * A refused upload in words: the server's message (it names the limit, the type or the row),
 * with the fields it names when the message alone does not say which.
 */
export function importRefusal(error: unknown): string | null {
  if (!error) return null
  if (!isApiError(error)) return 'The upload failed. Try again.'
  const fields = Object.entries(error.fields).filter(([, v]) => !error.message.includes(v))
  const extra = fields.length ? ` (${fields.map(([k, v]) => `${k} ${v}`).join('; ')})` : ''
  return `${error.message}${extra}`
}
