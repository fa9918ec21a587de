import type { IronStatus } from '../clinical'
import { dateInZone, daysBetween } from '../pathway/dates'
import { recentIronStatus, type IronStudies, type RecentIronStatus } from './ironStudies'
import { FALLING_HB_MARGIN_GL, NON_RESPONSE, RECHECK_MIN_DAYS_AFTER_DOSE } from './rules'

export interface MeasuredHb {
  takenAt: Date | string
  hbGL: number
}

export interface TreatmentGiven {
  kind: 'iv' | 'oral'
  firstDoseAt: Date | string
  lastDoseAt: Date | string
  totalMg: number
  /** The calculated deficit of the active prescription; null when none is on record. */
  deficitMg: number | null
}

export interface EvidenceInput {
  /** The clinic's today (todayInZone) and its zone, so sample days are read on one calendar. */
  today: string
  timeZone: string
  hb: MeasuredHb[]
  ironStatus: IronStatus | null
  /**
   * The iron studies with their sample times. When given, iron status is judged on the recent
   * ones only (recentIronStatus), and `ironStatus` above is not used for the evidence.
   */
  ironStudies?: IronStudies
  ironStudiesMaxAgeDays?: number
  treatment: TreatmentGiven | null
  resultMaxAgeDays: number
}

export type MissingEvidence = 'recent-hb' | 'iron-studies' | 'recent-iron-studies' | 'tsat-or-crp' | 'recheck-after-iron'

export interface Evidence {
  latest: { hbGL: number; date: string; ageDays: number } | null
  hbRecent: boolean
  ironKnown: boolean
  /** Iron-study values left out as too old (empty when none, or when no dates were given). */
  ironStudiesTooOld: RecentIronStatus['tooOld']
  /** Latest Hb before the first dose, and the latest taken long enough after the last dose. */
  baseline: { hbGL: number; date: string } | null
  recheck: { hbGL: number; date: string; daysAfterFirstDose: number } | null
  /** IV iron, a re-check 4 weeks or more after the first dose, and a rise under 10 g/L. */
  nonResponse: boolean
  /** After treatment the latest Hb is FALLING_HB_MARGIN_GL or more below the pre-treatment value. */
  falling: boolean
  missing: MissingEvidence[]
}

/**
 * What the measured results show, and what they do not. Pure: only measured values enter here;
 * the projection's assumed rise never does, so it can never supply evidence it has not seen.
 */
export function gatherEvidence(e: EvidenceInput): Evidence {
  const days = onClinicDays(e.hb, e.timeZone).filter((h) => h.date <= e.today)
  const last = days[days.length - 1]
  const latest = last ? { hbGL: last.hbGL, date: last.date, ageDays: daysBetween(last.date, e.today) } : null
  const hbRecent = latest !== null && latest.ageDays <= e.resultMaxAgeDays
  const iron: Pick<RecentIronStatus, 'status' | 'need' | 'tooOld'> = e.ironStudies
    ? recentIronStatus(e.ironStudies, e.today, e.timeZone, e.ironStudiesMaxAgeDays ?? e.resultMaxAgeDays)
    : {
        status: e.ironStatus,
        tooOld: [],
        need: e.ironStatus === null ? 'iron-studies' : e.ironStatus === 'indeterminate' ? 'tsat-or-crp' : 'ok',
      }
  const ironKnown = iron.need === 'ok'

  const { baseline, recheck, nonResponse, falling } = responseToIron(days, e.treatment, e.timeZone)

  const missing: MissingEvidence[] = []
  if (!hbRecent) missing.push('recent-hb')
  if (iron.need !== 'ok') missing.push(iron.need)
  if (e.treatment && !recheck) missing.push('recheck-after-iron')
  return { latest, hbRecent, ironKnown, ironStudiesTooOld: iron.tooOld, baseline, recheck, nonResponse, falling, missing }
}

interface HbDay {
  hbGL: number
  ms: number
  date: string
}

function onClinicDays(hb: readonly MeasuredHb[], timeZone: string): HbDay[] {
  return hb.map((h) => ({ hbGL: h.hbGL, ms: +new Date(h.takenAt), date: dateInZone(h.takenAt, timeZone) })).sort((a, b) => a.ms - b.ms)
}

export type IronResponse = Pick<Evidence, 'baseline' | 'recheck' | 'nonResponse' | 'falling'>

/**
 * What the measured Hb shows about the response to iron: the baseline before the first dose,
 * the re-check, non-response (IV iron, a rise under NON_RESPONSE.minRiseGL by
 * NON_RESPONSE.afterDays after the first dose) and a falling Hb (FALLING_HB_MARGIN_GL or more
 * below the value before treatment). It depends only on measured values and their dates, never
 * on today, so the server can keep it on the referral row for the worklist's filters.
 */
export function ironResponse(hb: readonly MeasuredHb[], treatment: TreatmentGiven | null, timeZone: string): IronResponse {
  return responseToIron(onClinicDays(hb, timeZone), treatment, timeZone)
}

function responseToIron(days: HbDay[], treatment: TreatmentGiven | null, timeZone: string): IronResponse {
  if (!treatment) return { baseline: null, recheck: null, nonResponse: false, falling: false }
  const firstMs = +new Date(treatment.firstDoseAt)
  const firstDate = dateInZone(treatment.firstDoseAt, timeZone)
  const lastDate = dateInZone(treatment.lastDoseAt, timeZone)
  const pre = days.filter((h) => h.ms < firstMs)
  const post = days.filter((h) => h.ms >= firstMs)
  const b = pre[pre.length - 1]
  const baseline = b ? { hbGL: b.hbGL, date: b.date } : null
  const rechecks = post.filter((h) => daysBetween(lastDate, h.date) >= RECHECK_MIN_DAYS_AFTER_DOSE)
  const r = rechecks[rechecks.length - 1]
  const recheck = r ? { hbGL: r.hbGL, date: r.date, daysAfterFirstDose: daysBetween(firstDate, r.date) } : null
  const lastPost = post[post.length - 1]
  // Without a pre-treatment value, the first Hb after the dose is the reference.
  const reference = b ?? (post.length > 1 ? post[0] : undefined)
  const falling =
    lastPost !== undefined && reference !== undefined && lastPost !== reference && lastPost.hbGL <= reference.hbGL - FALLING_HB_MARGIN_GL
  let nonResponse = false
  if (treatment.kind === 'iv' && baseline) {
    const late = post.filter((h) => daysBetween(firstDate, h.date) >= NON_RESPONSE.afterDays)
    const l = late[late.length - 1]
    nonResponse = l !== undefined && l.hbGL - baseline.hbGL < NON_RESPONSE.minRiseGL
  }
  return { baseline, recheck, nonResponse, falling }
}
