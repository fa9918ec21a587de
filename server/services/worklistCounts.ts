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

/** Totals being counted now, with the generations they started in. */
const counting = new Map<string, { seen: number[]; total: Promise<number> }>()

export async function cachedCount(key: string, sources: readonly WorklistSource[], count: () => Promise<number>): Promise<number> {
  const hit = totals.get(key)
  if (hit && same(hit.seen, snapshot(hit.sources)) && Date.now() - hit.at < COUNT_CACHE_MS) return hit.total
  // Requests that miss while the same total is being counted, with nothing it reads changed by this
  // process since that count started, share it: it is as fresh as a kept total, and under load every
  // request that missed ran its own scan of the queue (a tenth of a statement per worklist request).
  const running = counting.get(key)
  if (running && same(running.seen, snapshot(sources))) return running.total
  const startedIn = snapshot(sources)
  const pending = count()
  counting.set(key, { seen: startedIn, total: pending })
  try {
    const total = await pending
    // A change committed while this count ran may not be in it: use it once, do not keep it.
    if (same(startedIn, snapshot(sources))) {
      if (totals.size >= MAX_ENTRIES) totals.clear()
      totals.set(key, { total, at: Date.now(), sources, seen: startedIn })
    }
    return total
  } finally {
    if (counting.get(key)?.total === pending) counting.delete(key)
  }
}
