import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { isIsoDate } from '../../shared/pathway'
import { readinessBoard } from '../services/readiness'
import { Invalid } from '../errors'

export function readinessRoutes(_ctx: AppContext): ApiRouter {
  const api = new ApiRouter('/api/readiness')
  api.get('', { action: 'records.read' }, async (req, res) => {
    const { from, to, procedureCode, surgeonId } = req.query
    for (const [name, v] of [
      ['from', from],
      ['to', to],
    ] as const) {
      if (v !== undefined && !isIsoDate(v))
        throw new Invalid(`${name} must be a date (YYYY-MM-DD)`, { [name]: 'must be a date (YYYY-MM-DD)' })
    }
    const sid = surgeonId === undefined ? undefined : Number(surgeonId)
    if (sid !== undefined && (!Number.isSafeInteger(sid) || sid <= 0))
      throw new Invalid('surgeonId must be a positive whole number', { surgeonId: 'must be a positive whole number' })
    res.json({
      rows: await readinessBoard(viewerOf(req), {
        from: from as string | undefined,
        to: to as string | undefined,
        procedureCode: typeof procedureCode === 'string' && procedureCode ? procedureCode : undefined,
        surgeonId: sid,
      }),
    })
  })
  return api
}
