import type { Transaction } from 'sequelize'

/**
 * Worklist totals, kept for a few seconds. Counting a whole queue reads every matching index
 * entry (about half of a worklist request's database time over 25 000 referrals), yet a total
 * changes only when something is written. Each service that writes a row a total is counted
 * from says so with worklistChanged(), naming what it changed; the totals that depend on that
 * are forgotten once the change is committed, so this process never shows a stale total.
 * Another process's writes show within COUNT_CACHE_MS, well inside the worklist's refresh.
 * The rows themselves are always read fresh.
 */
export const COUNT_CACHE_MS = 3000
const MAX_ENTRIES = 500

/**
 * What a total is counted from: every total reads referral rows; a name or MRN search also
 * reads patients; a filter by operation code reads the procedure catalogue.
 */
export type WorklistSource = 'referral' | 'patient' | 'procedure'

const generation: Record<WorklistSource, number> = { referral: 0, patient: 0, procedure: 0 }
const totals = new Map<string, { total: number; at: number; sources: readonly WorklistSource[]; seen: number[] }>()

const snapshot = (sources: readonly WorklistSource[]) => sources.map((s) => generation[s])
const same = (a: number[], b: number[]) => a.every((g, i) => g === b[i])

function forget(what: WorklistSource): void {
  generation[what] += 1
  for (const [key, hit] of totals) if (hit.sources.includes(what)) totals.delete(key)
}

/**
 * Called by every service that inserts, updates or deletes rows of `what`. Inside a transaction
 * the totals are forgotten when it commits (a rollback changed nothing); a total counted while
 * the change was uncommitted is forgotten then too.
 */
export function worklistChanged(what: WorklistSource, t?: Transaction | null): void {
  if (t) t.afterCommit(() => forget(what))
  else forget(what)
}

/** Forgets every total: for writers outside the services (test factories, loaders). */
export function forgetWorklistCounts(): void {
  for (const s of Object.keys(generation) as WorklistSource[]) forget(s)
}

export async function cachedCount(key: string, sources: readonly WorklistSource[], count: () => Promise<number>): Promise<number> {
  const hit = totals.get(key)
  if (hit && same(hit.seen, snapshot(hit.sources)) && Date.now() - hit.at < COUNT_CACHE_MS) return hit.total
  const startedIn = snapshot(sources)
  const total = await count()
  // A change committed while this count ran may not be in it: use it once, do not keep it.
  if (same(startedIn, snapshot(sources))) {
    if (totals.size >= MAX_ENTRIES) totals.clear()
    totals.set(key, { total, at: Date.now(), sources, seen: startedIn })
  }
  return total
}
