import { ApiRouter } from './apiRouter'
import type { AppContext } from './context'
import { viewerOf } from './pathwayContext'
import { runReport } from '../services/reports/index'
import { tableToCsv } from '../services/reports/csv'
import { Invalid } from '../errors'
import { qualityReport } from '../services/reports/quality'
import { reportFilters } from '../services/reports/filters'
import { safeCsv } from '../services/reports/csvSafe'
import { nationalAuditCsv } from '../services/reports/nationalAudit'

const QUALITY_CSV_COLUMNS = [
  'id',
  'title',
  'numerator',
  'denominator',
  'percent',
  'value',
  'unit',
  'numeratorDefinition',
  'denominatorDefinition',
  'period',
  'source',
  'benchmarkPercent',
  'benchmarkSource',
] as const

/** The service's reports: admins and doctors see everything, surgeons their own figures (forced in the filters). */
export function reportRoutes({ sequelize }: AppContext): ApiRouter {
  const api = new ApiRouter('/api/reports')

  // Registered before '/:name': the quality measures have their own answer shape.
  api.get('/quality', { action: 'reports.read' }, async (req, res) => {
    const filters = reportFilters(viewerOf(req), req.query as Record<string, unknown>)
    const report = await qualityReport(sequelize, filters)
    if (req.query.format !== 'csv') {
      res.json(report)
      return
    }
    res.type('text/csv; charset=utf-8')
    res.attachment(`quality-${filters.from}-to-${filters.to}.csv`)
    res.send(
      safeCsv(
        QUALITY_CSV_COLUMNS,
        report.measures.map((m) => ({
          id: m.id,
          title: m.title,
          numerator: m.numerator,
          denominator: m.denominator,
          percent: m.percent,
          value: m.value,
          unit: m.unit,
          numeratorDefinition: m.definition.numerator,
          denominatorDefinition: m.definition.denominator,
          period: m.definition.period,
          source: m.source,
          benchmarkPercent: m.benchmark?.percent ?? null,
          benchmarkSource: m.benchmark?.source ?? null,
        })),
      ),
    )
  })
  // One row per operated episode for the national audits: patient-level, so not for admins (figures only).
  api.get('/quality/national-audit', { action: 'reports.patientRows' }, async (req, res) => {
    const filters = reportFilters(viewerOf(req), req.query as Record<string, unknown>)
    const csv = await nationalAuditCsv(sequelize, viewerOf(req), filters)
    res.type('text/csv; charset=utf-8')
    res.attachment(`national-audit-${filters.from}-to-${filters.to}.csv`)
    res.send(csv)
  })

  api.get('/:name', { action: 'reports.read' }, async (req, res) => {
    const name = String(req.params.name)
    const report = await runReport(sequelize, viewerOf(req), name, req.query as Record<string, unknown>)
    if (req.query.format !== 'csv') {
      res.json(report)
      return
    }
    // One table per download; the first unless ?table= names another.
    const names = Object.keys(report.tables)
    const table = typeof req.query.table === 'string' && req.query.table !== '' ? req.query.table : names[0]!
    if (!Object.hasOwn(report.tables, table))
      throw new Invalid(`table must be one of ${names.join(', ')}`, { table: `must be one of ${names.join(', ')}` })
    res.type('text/csv; charset=utf-8')
    res.attachment(`${name}-${table}-${report.period.from}-to-${report.period.to}.csv`)
    res.send(tableToCsv(report.tables[table]))
  })
  return api
}
