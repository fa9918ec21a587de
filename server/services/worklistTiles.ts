import type { Sequelize } from 'sequelize'
import { WORKLIST_FLAGS, type WorklistFlag } from '../../shared/pathway'
import type { WorklistCounts } from '../../shared/pathway/views'
import type { WorklistCountsQuery } from '../../shared/schemas/referrals'
import type { Viewer } from './viewer'
import { countWorklist, worklistFilter } from './worklistFilter'

/**
 * The home screens' count tiles in one request instead of one per tile. Each count is the very
 * count the worklist itself gives for that slice (same filter, same cache entry), so a tile and
 * the list it links to always agree. Without `flag`, every flag is counted.
 */
export async function worklistTiles(sequelize: Sequelize, viewer: Viewer, q: WorklistCountsQuery): Promise<WorklistCounts> {
  const { flag, ...slice } = q
  const asked = (flag?.length ? [...new Set(flag)] : [...WORKLIST_FLAGS]) as WorklistFlag[]
  // Built before any query runs, so a refused filter (another surgeon's list) counts nothing.
  const base = worklistFilter(viewer, slice)
  const perFlag = asked.map((f) => worklistFilter(viewer, { ...slice, flag: [f] }))
  const [total, ...counts] = await Promise.all([countWorklist(sequelize, base), ...perFlag.map((f) => countWorklist(sequelize, f))])
  return { total, flags: Object.fromEntries(asked.map((f, i) => [f, counts[i]!])) }
}
