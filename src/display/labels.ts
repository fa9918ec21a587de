import type { Stage, WorklistFlag } from '@shared/pathway'
import { ANALYTE_DEFS, isAnalyte } from '@shared/pathway'
import type { IronStatus } from '@shared/clinical'
import type { IronDoseCap } from '@shared/clinical/ironPlan'
import type { BloodOrderKind, ReadinessFlag, Verdict } from '@shared/clinic/readiness'

/** Stages in which the screening outcome's proposal is still waiting to be confirmed. */
export const SCREENING_STAGES: readonly Stage[] = ['referred', 'screened']

/** Tag tones from our theme: green = done, amber = needs attention, neutral = in hand or finished. */
export type Tone = 'info' | 'success' | 'warn' | 'secondary' | 'danger'

/** Concerns beside the readiness verdict: amber needs attention; red only where blood may not be there in time. */
export const READINESS_FLAG_LOOK: Record<ReadinessFlag, { icon: string; tone: Tone }> = {
  'no-response-to-iron': { icon: 'pi pi-minus-circle', tone: 'warn' },
  'hb-falling': { icon: 'pi pi-arrow-down-right', tone: 'danger' },
  'red-cell-antibodies': { icon: 'pi pi-exclamation-circle', tone: 'danger' },
  'declines-transfusion': { icon: 'pi pi-ban', tone: 'warn' },
  'result-too-old': { icon: 'pi pi-history', tone: 'warn' },
  'iron-studies-too-old': { icon: 'pi pi-history', tone: 'warn' },
}

/** Each stage shows its label with an icon and a tone, never the colour alone. */
export const STAGE_LOOK: Record<Stage, { icon: string; tone: Tone }> = {
  referred: { icon: 'pi pi-inbox', tone: 'info' },
  screened: { icon: 'pi pi-list-check', tone: 'info' },
  clinic: { icon: 'pi pi-user-edit', tone: 'info' },
  treating: { icon: 'pi pi-sync', tone: 'info' },
  recheck: { icon: 'pi pi-hourglass', tone: 'info' },
  cleared: { icon: 'pi pi-check-circle', tone: 'success' },
  operated: { icon: 'pi pi-verified', tone: 'success' },
  closed: { icon: 'pi pi-lock', tone: 'secondary' },
  deferred: { icon: 'pi pi-calendar-times', tone: 'warn' },
  withdrawn: { icon: 'pi pi-ban', tone: 'secondary' },
}

// Partial on purpose: a flag added to shared/pathway shows with the generic icon until it gets its own.
const FLAG_ICONS: Partial<Record<WorklistFlag, string>> = {
  'surgery-soon-anaemic': 'pi pi-exclamation-triangle',
  'no-screening-result': 'pi pi-question-circle',
  'recheck-overdue': 'pi pi-clock',
  'treatment-not-given': 'pi pi-hourglass',
  'date-change-requested': 'pi pi-calendar-clock',
  'no-response-to-iron': 'pi pi-minus-circle',
  'hb-falling': 'pi pi-arrow-down-right',
}

export function flagIcon(flag: WorklistFlag): string {
  return FLAG_ICONS[flag] ?? 'pi pi-flag'
}

/** Iron status in the words the clinic uses (the clinical library returns identifiers). */
export const IRON_STATUS_LABELS: Record<IronStatus, string> = {
  'absolute-deficiency': 'Iron deficient',
  'iron-restricted': 'Iron-restricted',
  replete: 'Iron replete',
  indeterminate: 'Unclear — needs TSAT',
}

export function ironStatusLabel(status: IronStatus | null | undefined): string {
  return status ? IRON_STATUS_LABELS[status] : 'No iron studies yet'
}

export const SEVERITY_LABELS = { none: 'none', mild: 'mild', moderate: 'moderate', severe: 'severe' } as const

/** Names for every stored analyte, including those the server derives. */
export function analyteLabel(analyte: string): string {
  if (analyte === 'egfr') return 'eGFR (CKD-EPI 2021)'
  return isAnalyte(analyte) ? ANALYTE_DEFS[analyte].label : analyte
}

/** The order results are read in: blood count, iron studies, inflammation, kidney, vitamins. */
export const RESULT_ORDER = [
  'hb',
  'mcv',
  'ferritin',
  'tsat',
  'iron',
  'transferrin',
  'tibc',
  'crp',
  'creatinine',
  'egfr',
  'b12',
  'folate',
  'phosphate',
]

/** Schema messages name the API field first ("value is required"); under a form field they start a sentence. */
export function asSentence(message: string | undefined): string {
  return message ? message.charAt(0).toUpperCase() + message.slice(1) : ''
}

/** Readiness verdicts: word (from the server's VERDICT_LABELS) plus an icon and a tone, never colour alone. */
export const VERDICT_LOOK: Record<Verdict, { icon: string; tone: Tone }> = {
  ready: { icon: 'pi pi-check-circle', tone: 'success' },
  // Not a judgement on the patient: an instruction to take the bloods that would clear them.
  'results-needed': { icon: 'pi pi-hourglass', tone: 'info' },
  optimise: { icon: 'pi pi-exclamation-triangle', tone: 'warn' },
  // Deferral is a prompt to talk, not a refusal: amber, not red.
  'consider-deferral': { icon: 'pi pi-calendar-times', tone: 'warn' },
}

/** The formulary caps in words, for "which cap limited this dose". */
export const CAP_LABELS: Record<IronDoseCap, string> = {
  maxSingleDoseMg: 'largest single dose',
  maxSingleDoseMgPerKg: 'mg per kg limit',
  paediatricMaxSingleDoseMg: 'largest single dose under 18',
  paediatricMaxSingleDoseMgPerKg: 'mg per kg limit under 18',
  maxWeeklyMg: 'weekly limit',
  maxTotalMg: 'course maximum',
  roundToMg: 'vial size (dose step)',
}

export function capLabel(cap: string): string {
  return CAP_LABELS[cap as IronDoseCap] ?? cap
}

export const REACTION_LABELS = {
  none: 'None',
  mild: 'Mild',
  moderate: 'Moderate',
  severe: 'Severe',
} as const

/** "Group and screen" or "Crossmatch 2 units": the blood to have ready. */
export function bloodOrderText(order: { kind: BloodOrderKind; units: number } | null | undefined): string {
  if (!order) return '—'
  if (order.kind === 'group-and-screen') return 'Group and screen'
  return `Crossmatch ${order.units} unit${order.units === 1 ? '' : 's'}`
}

/** "Needs a recent Hb: the latest …" → "Needs a recent Hb": the short form for a table cell. */
export function needHeadline(need: string): string {
  return need.split(':')[0]!.replace(/\.$/, '')
}
