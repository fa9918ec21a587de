/**
 * The stages of one surgical episode (a referral). Identifiers are stable API values; the
 * labels and next-action wording are Ferrolane's own and may be reworded freely.
 */
export const STAGES = [
  'referred',
  'screened',
  'clinic',
  'treating',
  'recheck',
  'cleared',
  'operated',
  'closed',
  'deferred',
  'withdrawn',
] as const
export type Stage = (typeof STAGES)[number]

export function isStage(value: unknown): value is Stage {
  return typeof value === 'string' && (STAGES as readonly string[]).includes(value)
}

export const STAGE_LABELS: Record<Stage, string> = {
  referred: 'Awaiting screening',
  screened: 'Screening to confirm',
  clinic: 'For anaemia clinic',
  treating: 'Iron therapy under way',
  recheck: 'Awaiting re-check bloods',
  cleared: 'Fit for theatre',
  operated: 'Surgery done',
  closed: 'Episode closed',
  deferred: 'Surgery postponed',
  withdrawn: 'Off the pathway',
}

/** What the team should do next, as the worklist shows it. */
const NEXT_ACTIONS: Record<Stage, string> = {
  referred: 'Take or enter screening bloods',
  screened: 'Confirm the screening outcome',
  clinic: 'Review in anaemia clinic',
  treating: 'Give the planned iron and book the re-check',
  recheck: 'Enter the re-check Hb and decide',
  cleared: 'Await surgery',
  operated: 'Post-operative check, then close',
  closed: 'None — read only',
  deferred: 'Review when the new date is known',
  withdrawn: 'Close the episode',
}

export function nextAction(stage: Stage): string {
  return NEXT_ACTIONS[stage]
}

/** Stages before surgery in which the worklist flags still matter. */
export const PRE_OPERATIVE_STAGES: readonly Stage[] = ['referred', 'screened', 'clinic', 'treating', 'recheck', 'cleared']

/** A closed episode is read-only: no moves, no new results, no edits. */
export const READ_ONLY_STAGES: readonly Stage[] = ['closed']

/** Order for sorting by stage: the pathway's own order, side exits last. */
export function stageOrder(stage: Stage): number {
  return STAGES.indexOf(stage)
}
