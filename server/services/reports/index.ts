import type { Sequelize } from 'sequelize'
import { isReportName, type Report, type ReportName } from '../../../shared/reports'
import type { Viewer } from '../viewer'
import { NotFound } from '../../errors'
import { reportFilters, type ReportFilters } from './filters'
import { funnelReport } from './funnel'
import { haemoglobinReport } from './haemoglobin'
import { transfusionReport } from './transfusion'
import { waitingTimesReport } from './waitingTimes'
import { bloodOrderingReport } from './bloodOrdering'

const BUILDERS: Record<ReportName, (s: Sequelize, f: ReportFilters) => Promise<Report>> = {
  funnel: funnelReport,
  haemoglobin: haemoglobinReport,
  transfusion: transfusionReport,
  'waiting-times': waitingTimesReport,
  'blood-ordering': bloodOrderingReport,
}

export async function runReport(sequelize: Sequelize, viewer: Viewer, name: string, query: Record<string, unknown>): Promise<Report> {
  if (!isReportName(name)) throw new NotFound(`Report "${name}"`)
  return BUILDERS[name](sequelize, reportFilters(viewer, query))
}
