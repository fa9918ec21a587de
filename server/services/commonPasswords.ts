import { readFileSync } from 'node:fs'

/**
 * The shipped list of common and breached passwords (server/security/common-passwords.txt), read
 * once on first use. Checked locally: a password never leaves the server (ASVS 2.1.7).
 */
let list: Set<string> | null = null

function load(): Set<string> {
  const text = readFileSync(new URL('../security/common-passwords.txt', import.meta.url), 'utf8')
  return new Set(text.split('\n').filter((line) => line && !line.startsWith('#')))
}

/**
 * True when the password is on the list, also after dropping the digits and punctuation people
 * tack on to meet a length rule ("monkey123456!" is "monkey").
 */
export function isCommonPassword(password: string): boolean {
  list ??= load()
  const lower = password.normalize('NFKC').toLowerCase()
  if (list.has(lower)) return true
  const stem = lower.replace(/[\d\W_]+$/u, '')
  return stem.length >= 6 && list.has(stem)
}
