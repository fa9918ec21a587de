import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { runReport } from '../services/reports/index'
import { tableToCsv } from '../services/reports/csv'
import { Invalid } from '../errors'
import { qualityReport } from '../services/reports/quality'
import { reportFilters } from '../services/reports/filters'

/** The service's reports: admins and doctors see everything, surgeons their own figures (forced in the filters). */
export function reportRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/reports')

  // Registered before '/:name': the quality measures have their own answer shape.
  api.get('/quality', { access: ['admin', 'doctor', 'surgeon'] }, async (req, res) => {
    res.json(await qualityReport(sequelize, reportFilters(viewerOf(req), req.query as Record<string, unknown>)))
  })

  api.get('/:name', { access: ['admin', 'doctor', 'surgeon'] }, async (req, res) => {
    const name = String(req.params.name)
    const report = await runReport(sequelize, viewerOf(req), name, req.query as Record<string, unknown>)
    if (req.query.format !== 'csv') {
      res.json(report)
      return
    }
    // One table per download; the first unless ?table= names another.
    const names = Object.keys(report.tables)
    const table = typeof req.query.table === 'string' && req.query.table !== '' ? req.query.table : names[0]!
    if (!Object.hasOwn(report.tables, table)) throw new Invalid(`table must be one of ${names.join(', ')}`, { table: `must be one of ${names.join(', ')}` })
    res.type('text/csv; charset=utf-8')
    res.attachment(`${name}-${table}-${report.period.from}-to-${report.period.to}.csv`)
    res.send(tableToCsv(report.tables[table]))
  })
  return api
}
