import { randomBytes, scrypt, timingSafeEqual, type ScryptOptions } from 'node:crypto'

/**
 * scrypt from node:crypto: memory-hard, no native add-on to download. OWASP's Password Storage
 * Cheat Sheet (section "scrypt", OWASP/CheatSheetSeries as of August 2026) lists five settings,
 * from N=2^17, r=8, p=1 (128 MiB) to N=2^13, r=8, p=10 (8 MiB), and says they "provide a similar
 * minimal level of defense, with the main trade-off between parallelism and RAM usage". Ferrolane
 * uses its N=2^15 (32 MiB), r=8, p=3: a quarter of the memory per sign-in for the same defence
 * (decided by the lead engineer, issue #19: the 128 MiB setting alone took the server over its
 * 200 MB budget). An operator may raise N (PASSWORD_SCRYPT_LOG2N); the test run lowers it so
 * hundreds of sign-ins stay quick, and production refuses to start below 15 (server/productionChecks.ts).
 * Hashes made at the earlier N=2^17, r=8, p=1 keep verifying (their parameters are stored) and are
 * rehashed at the next sign-in (needsRehash).
 */
export const OWASP_LOG2N = 15
const R = 8
const P = 3
const KEY_LENGTH = 32
let costLog2N = OWASP_LOG2N

/** Called once by createApp from the typed config. */
export function setPasswordCost(log2N: number): void {
  costLog2N = log2N
  // Made now, not at the first unknown e-mail: that first refusal would otherwise take two hashes.
  dummyHashFor(log2N)
}

function params(N: number, r: number, p: number): ScryptOptions {
  // scrypt needs 128·N·r bytes; leave headroom so OpenSSL's own check never refuses it.
  return { N, r, p, maxmem: 128 * N * r * 2 }
}

/** scrypt runs so far: lets a test prove every sign-in path pays one (no timing oracle). */
export const hashWork = { derivations: 0 }

// Each derivation holds 128·N·r bytes (32 MiB at the default cost; p's three passes run one after
// another in that same block) while it runs, on one of libuv's four threads. Run side by side, a
// handful of sign-ins (or the start-up's dummy hash beside the first sign-in) took the process's
// resident memory up by that much each: they take turns instead, so a burst of sign-ins costs time,
// not memory, and leaves threads for files (README, performance notes: why one at a time).
let previous: Promise<unknown> = Promise.resolve()

function derive(password: string, salt: Buffer, options: ScryptOptions): Promise<Buffer> {
  hashWork.derivations += 1
  const input = password.normalize('NFKC')
  const run = previous.then(
    () =>
      new Promise<Buffer>((resolve, reject) => scrypt(input, salt, KEY_LENGTH, options, (err, key) => (err ? reject(err) : resolve(key)))),
  )
  previous = run.catch(() => undefined)
  return run
}

/** Stored as `scrypt$N$r$p$salt$hash` so the cost can rise later without breaking old hashes. */
export async function hashPassword(password: string): Promise<string> {
  const N = 2 ** costLog2N
  const salt = randomBytes(16)
  const key = await derive(password, salt, params(N, R, P))
  return ['scrypt', N, R, P, salt.toString('base64'), key.toString('base64')].join('$')
}

export async function verifyPassword(password: string, stored: string): Promise<boolean> {
  const [scheme, n, r, p, salt, hash] = stored.split('$')
  if (scheme !== 'scrypt' || !salt || !hash) return false
  const expected = Buffer.from(hash, 'base64')
  const key = await derive(password, Buffer.from(salt, 'base64'), params(Number(n), Number(r), Number(p)))
  return key.length === expected.length && timingSafeEqual(key, expected)
}

/** True when a stored hash was made at another cost than today's: rehash it at the next sign-in. */
export function needsRehash(stored: string): boolean {
  const [scheme, n, r, p] = stored.split('$')
  return scheme !== 'scrypt' || Number(n) !== 2 ** costLog2N || Number(r) !== R || Number(p) !== P
}

// An unknown e-mail (or a deactivated account) still costs one hash at today's cost, so response
// time does not reveal which accounts exist or are switched off.
const dummyHashes = new Map<number, Promise<string>>()
function dummyHashFor(log2N: number): Promise<string> {
  let hash = dummyHashes.get(log2N)
  if (!hash) {
    hash = hashPassword('ferrolane-timing-equaliser')
    hash.catch(() => dummyHashes.delete(log2N))
    dummyHashes.set(log2N, hash)
  }
  return hash
}

export async function burnPasswordCheck(password: string): Promise<void> {
  await verifyPassword(password, await dummyHashFor(costLog2N))
}

/** A temporary password an admin can read out: 4 groups of 4 from an unambiguous alphabet. */
export function temporaryPassword(): string {
  const alphabet = 'abcdefghjkmnpqrstuvwxyz23456789'
  const bytes = randomBytes(16)
  const chars = [...bytes].map((b) => alphabet[b % alphabet.length])
  return [0, 4, 8, 12].map((i) => chars.slice(i, i + 4).join('')).join('-')
}
