import type { WorklistFlag } from './flags'

/**
 * GET /api/worklist/counts: every count tile of a home screen in one answer. `total` is the
 * slice the filters describe; `flags` holds, for each flag asked for, how many episodes of that
 * slice carry it (the same number GET /api/worklist?flag=… gives as its total).
 */
export interface WorklistCounts {
  total: number
  flags: Partial<Record<WorklistFlag, number>>
}
