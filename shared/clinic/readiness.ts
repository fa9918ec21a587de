/**
 * Readiness verdicts the projection gives; identifiers stable, labels in our words.
 * 'results-needed' is Ferrolane's word for "nothing measured argues against surgery, but the
 * measured evidence that would clear the patient is not there yet" — a clinician reads it as
 * an instruction (take the bloods), not as a judgement on the patient.
 */
export const VERDICTS = ['ready', 'results-needed', 'optimise', 'consider-deferral'] as const
export type Verdict = (typeof VERDICTS)[number]

export const VERDICT_LABELS: Record<Verdict, string> = {
  ready: 'Ready for surgery',
  'results-needed': 'Results needed',
  optimise: 'Still to optimise',
  'consider-deferral': 'Consider deferral',
}

export type BloodOrderKind = 'group-and-screen' | 'crossmatch'

/** Concerns the verdict raises beside its reasons; each is also shown as a tag. */
export const READINESS_FLAGS = [
  'no-response-to-iron',
  'hb-falling',
  'red-cell-antibodies',
  'declines-transfusion',
  'result-too-old',
  'iron-studies-too-old',
] as const
export type ReadinessFlag = (typeof READINESS_FLAGS)[number]

export const READINESS_FLAG_LABELS: Record<ReadinessFlag, string> = {
  'no-response-to-iron': 'No response to IV iron',
  'hb-falling': 'Hb falling after iron',
  'red-cell-antibodies': 'Red-cell antibodies',
  'declines-transfusion': 'Declines transfusion',
  'result-too-old': 'Latest Hb too old',
  'iron-studies-too-old': 'Iron studies too old',
}

export const DECISION_SUPPORT_CAUTION =
  "Decision support only: check doses, projections and blood orders against local protocols and the product's prescribing " +
  'information. The licensed clinical team decides.'
