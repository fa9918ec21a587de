import { classifyIronStatus, type IronStatus } from '../clinical'
import { dateInZone, daysBetween } from '../pathway/dates'

/** One iron-study value as measured: canonical unit (µg/L, %, mg/L) and when the sample was taken. */
export interface TakenValue {
  value: number
  takenAt: Date | string
}

/** The latest ferritin, TSAT and CRP on the episode, each with its own sample time. */
export interface IronStudies {
  ferritin?: TakenValue
  tsat?: TakenValue
  crp?: TakenValue
}

export interface RecentIronStatus {
  /** Iron status from the recent values only; null when no recent ferritin exists. */
  status: IronStatus | null
  /** Values left out because they are older than the limit, oldest first, with their age. */
  tooOld: { analyte: 'ferritin' | 'tsat' | 'crp'; date: string; ageDays: number }[]
  /** 'ok', or what is missing, in the order a clinician would fix it. */
  need: 'ok' | 'iron-studies' | 'recent-iron-studies' | 'tsat-or-crp'
}

/**
 * Iron status judged only on iron studies recent enough to describe the patient now. Ferritin,
 * TSAT and CRP move with treatment, bleeding and inflammation, so a value older than
 * `maxAgeDays` (ClinicSettings.ironStudiesMaxAgeDays, default 90 days: local policy, in line
 * with the Australian NBA pre-operative template's "no older than 3 months", secondary source)
 * is left out. If that leaves no ferritin, or leaves the status indeterminate when an old
 * TSAT or CRP would have settled it, the verdict asks for recent iron studies instead of
 * clearing the patient on old ones. Sample days are read on the clinic's calendar.
 */
export function recentIronStatus(s: IronStudies, today: string, timeZone: string, maxAgeDays: number): RecentIronStatus {
  const tooOld: RecentIronStatus['tooOld'] = []
  const recent: Partial<Record<'ferritin' | 'tsat' | 'crp', number>> = {}
  for (const analyte of ['ferritin', 'tsat', 'crp'] as const) {
    const v = s[analyte]
    if (!v) continue
    const date = dateInZone(v.takenAt, timeZone)
    const ageDays = daysBetween(date, today)
    if (ageDays > maxAgeDays) tooOld.push({ analyte, date, ageDays })
    else if (ageDays >= 0) recent[analyte] = v.value
  }
  tooOld.sort((a, b) => b.ageDays - a.ageDays)
  if (recent.ferritin === undefined) {
    return { status: null, tooOld, need: s.ferritin ? 'recent-iron-studies' : 'iron-studies' }
  }
  const status = classifyIronStatus({ ferritinUgL: recent.ferritin, tsatPct: recent.tsat, crpMgL: recent.crp })
  if (status !== 'indeterminate') return { status, tooOld, need: 'ok' }
  return { status, tooOld, need: tooOld.length ? 'recent-iron-studies' : 'tsat-or-crp' }
}
