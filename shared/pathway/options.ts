import type { AnaemiaCriteria } from '../clinical'

export const PRIORITIES = ['routine', 'urgent', 'cancer'] as const
export type Priority = (typeof PRIORITIES)[number]
export const PRIORITY_LABELS: Record<Priority, string> = {
  routine: 'Routine',
  urgent: 'Urgent',
  cancer: 'Cancer pathway',
}

export const BLOOD_ORDERS = ['group-and-screen', 'crossmatch'] as const
export type BloodOrder = (typeof BLOOD_ORDERS)[number]

/**
 * The clinic screens major-surgery patients against Hb < 130 g/L for both sexes (Muñoz 2017
 * consensus). Stored on each referral with its outcome, so a later change of clinic policy
 * does not silently re-label past screening.
 */
export const DEFAULT_ANAEMIA_CRITERIA: AnaemiaCriteria = 'surgical'
