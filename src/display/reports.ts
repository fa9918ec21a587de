import type { Definition, ReportName, ReportTable } from '@shared/reports'

/** Screen labels for the report columns (the API keeps its stable keys; the CSV keeps the keys too). */
const COLUMN_LABELS: Record<string, string> = {
  step: 'Step',
  label: 'Step',
  count: 'Episodes',
  percent: '% of denominator',
  binFromGL: 'From (g/L)',
  binToGL: 'Below (g/L)',
  screening: 'At screening',
  surgeryDay: 'On the surgery day',
  productCode: 'Product',
  patients: 'Episodes',
  medianRiseGL: 'Median rise (g/L)',
  groupKey: 'Group',
  groupName: 'Name',
  treated: 'Treated with iron',
  withHb: 'With an Hb before surgery',
  stillAnaemic: 'Still anaemic',
  stillAnaemicPercent: 'Still anaemic (%)',
  transfused: 'Transfused',
  transfusionRatePercent: 'Transfusion rate (%)',
  units: 'Units',
  unitsPerPatient: 'Units per episode',
  leg: 'Leg',
  episodes: 'Episodes',
  medianDays: 'Median (days)',
  p90Days: '90th centile (days)',
  procedureCode: 'Code',
  procedureName: 'Operation',
  patientsCrossmatched: 'Crossmatched (episodes)',
  unitsCrossmatched: 'Units crossmatched',
  patientsTransfused: 'Transfused (episodes)',
  unitsTransfused: 'Units transfused',
  ctRatio: 'C:T ratio',
  transfusionProbabilityPercent: 'T (%)',
  transfusionIndex: 'TI',
  usualBloodOrder: 'Catalogue order',
  usualUnits: 'Catalogue units',
  suggestion: 'Suggested change',
  suggestionReason: 'Why',
  meanBloodLossMl: 'Observed mean loss (mL)',
  usualBloodLossMl: 'Catalogue usual loss (mL)',
}

export const TABLE_TITLES: Record<string, string> = {
  funnel: 'Steps of the pathway',
  distribution: 'Hb by 10 g/L band',
  riseByProduct: 'Median Hb rise by iron product',
  byOperation: 'By operation',
  bySurgeon: 'By surgeon',
  waitingTimes: 'Legs of the pathway',
  bloodOrdering: 'Per operation',
}

const SUGGESTIONS: Record<string, string> = {
  keep: 'Keep the current order',
  'group-and-screen': 'Change to group and screen',
  'fewer-units': 'Crossmatch fewer units',
  crossmatch: 'Change to crossmatch',
}
const ORDERS: Record<string, string> = { 'group-and-screen': 'Group and screen', crossmatch: 'Crossmatch' }

/** In the funnel and waiting times the row names the figure, so the text column replaces the key. */
const HIDDEN_COLUMNS = new Set(['step', 'leg'])

export function columnsOf(table: ReportTable) {
  return table.columns.filter((c) => !HIDDEN_COLUMNS.has(c.key)).map((c) => ({ key: c.key, label: COLUMN_LABELS[c.key] ?? c.label }))
}

export function cellText(key: string, v: unknown): string {
  if (v == null) return '—'
  if (typeof v === 'boolean') return v ? 'Yes' : 'No'
  if (key === 'suggestion') return SUGGESTIONS[String(v)] ?? String(v)
  if (key === 'usualBloodOrder') return ORDERS[String(v)] ?? String(v)
  return String(v)
}

export function isNumeric(key: string): boolean {
  return ![
    'label',
    'groupKey',
    'groupName',
    'productCode',
    'procedureCode',
    'procedureName',
    'usualBloodOrder',
    'suggestion',
    'suggestionReason',
    'treated',
  ].includes(key)
}

/** The definitions a table states: one per row (funnel, waiting times) or one per column. */
export function definitionsOf(table: ReportTable): { figure: string; d: Definition }[] {
  return Object.entries(table.definitions).map(([key, d]) => {
    const row = table.rows.find((r) => r.step === key || r.leg === key)
    return { figure: row ? String(row.label) : (COLUMN_LABELS[key] ?? key), d }
  })
}

export type ChartKind = 'funnel' | 'distribution' | 'waiting' | null

/** Where a picture says more than the table; the table below stays the text alternative. */
export function chartFor(report: ReportName, table: string): ChartKind {
  if (report === 'funnel' && table === 'funnel') return 'funnel'
  if (report === 'haemoglobin' && table === 'distribution') return 'distribution'
  if (report === 'waiting-times') return 'waiting'
  return null
}
