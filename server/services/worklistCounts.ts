import type { Sequelize } from 'sequelize'

/**
 * Worklist totals, kept for a few seconds. Counting a whole queue reads every matching index
 * entry (about half of a worklist request's database time over 25 000 referrals), yet a total
 * changes only when something is written. Every write statement this process completes (a
 * COMMIT, or an INSERT/UPDATE/DELETE outside a transaction) forgets all totals, so this process
 * never shows a stale total; another process's writes show within COUNT_CACHE_MS, well inside
 * the worklist's 15-second refresh. The rows themselves are always read fresh.
 */
export const COUNT_CACHE_MS = 3000
const MAX_ENTRIES = 500
// Bookkeeping that never moves a referral between queues: sessions, the read-audit, throttling.
const IRRELEVANT_WRITE = /^\s*(?:INSERT\s+INTO|UPDATE|DELETE\s+FROM)\s+`?(?:sessions|audit_entries|login_failures)`?\s/i
const READ = /^\s*(?:SELECT|SHOW|SET|START\s+TRANSACTION|BEGIN)\b/i

let generation = 0
const totals = new Map<string, { total: number; at: number; generation: number }>()

export function forgetWorklistCounts(): void {
  generation += 1
  totals.clear()
}

/** Installs the forgetting on a Sequelize instance; afterQuery runs once the statement is done. */
export function forgetCountsOnEveryWrite(sequelize: Sequelize): void {
  sequelize.removeHook('afterQuery', 'forgetWorklistCounts')
  sequelize.addHook('afterQuery', 'forgetWorklistCounts', (_options, query) => {
    // AbstractQuery's typings omit the statement it ran; the dialect's Query sets `sql`.
    const sql = (query as unknown as { sql?: string }).sql ?? ''
    if (READ.test(sql) || IRRELEVANT_WRITE.test(sql)) return
    forgetWorklistCounts()
  })
}

export async function cachedCount(key: string, count: () => Promise<number>): Promise<number> {
  const hit = totals.get(key)
  if (hit && hit.generation === generation && Date.now() - hit.at < COUNT_CACHE_MS) return hit.total
  const startedIn = generation
  const total = await count()
  // A write that completed while this count ran may not be in it: use it once, do not keep it.
  if (startedIn === generation) {
    if (totals.size >= MAX_ENTRIES) totals.clear()
    totals.set(key, { total, at: Date.now(), generation })
  }
  return total
}
