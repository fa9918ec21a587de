/** Readiness verdicts the projection gives; identifiers stable, labels in our words. */
export const VERDICTS = ['ready', 'optimise', 'consider-deferral'] as const
export type Verdict = (typeof VERDICTS)[number]

export const VERDICT_LABELS: Record<Verdict, string> = {
  ready: 'Ready for surgery',
  optimise: 'Still to optimise',
  'consider-deferral': 'Consider deferral',
}

export type BloodOrderKind = 'group-and-screen' | 'crossmatch'

export const DECISION_SUPPORT_CAUTION =
  'Decision support only: check doses, projections and blood orders against local protocols and the product\'s prescribing information. The licensed clinical team decides.'
