import { createHash, randomBytes } from 'node:crypto'

/** 32 random bytes: unguessable, and short enough for a link in an e-mail. */
export function newReplyToken(): { token: string; hash: string } {
  const token = randomBytes(32).toString('base64url')
  return { token, hash: hashReplyToken(token) }
}

/** Only this hash is stored, so a copy of the database cannot answer for a patient. */
export function hashReplyToken(token: string): string {
  return createHash('sha256').update(token, 'utf8').digest('hex')
}

/** The shape every token in a link has; anything else is rejected before a database lookup. */
export function looksLikeReplyToken(token: string): boolean {
  return /^[A-Za-z0-9_-]{43}$/.test(token)
}
