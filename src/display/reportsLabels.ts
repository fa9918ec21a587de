import type { Complication } from '@shared/schemas/outcomes'
import type { ReportName } from '@shared/reports'

/** Complications as the ward says them; the API values stay stable. */
export const COMPLICATION_LABELS: Record<Complication, string> = {
  infection: 'Infection (wound, chest or urine)',
  'acute-kidney-injury': 'Acute kidney injury',
  'myocardial-injury': 'Myocardial injury',
  thromboembolism: 'Venous thromboembolism',
  'return-to-theatre': 'Return to theatre',
  none: 'None of these',
}

export const REPORT_TITLES: Record<ReportName, string> = {
  funnel: 'Pathway funnel',
  haemoglobin: 'Hb at screening and on the day',
  transfusion: 'Anaemia and transfusion',
  'waiting-times': 'Waiting times',
  'blood-ordering': 'Blood ordering audit',
}
