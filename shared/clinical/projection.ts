import { ClinicalInputError, requireDate, requireInRange, requireOneOf, optionalInRange } from './errors'
import { CLINICAL_LIMITS } from './limits'
import { localDate, zonedToUtc } from '../appointments/time'

export interface HbMeasurement {
  takenAt: Date | string
  hbGL: number
}

export interface HbTreatment {
  kind: 'iv' | 'oral'
  firstDoseDate: Date | string
  /** Iron given so far (mg). With deficitMg it scales the assumed rise. */
  totalMg?: number
  /** The calculated iron deficit (Ganzoni) the course was meant to replace (mg). */
  deficitMg?: number
}

export interface ResponseAssumption {
  riseGLPerWeek?: number
  maxRiseGL?: number
  onsetDays?: number
}

export interface HbProjection {
  hbGL: number
  method: 'trend' | 'expected-response' | 'latest-value'
  assumptions: string[]
  /** Fitted slope, when method is 'trend'. */
  slopeGLPerWeek?: number
  /** Share of the calculated deficit given (0–1), when both were known and scaled the assumed rise. */
  doseFraction?: number
}

/**
 * Default expected responses before any re-check. IV: IV iron typically raises Hb 10–20 g/L
 * over 4–8 weeks (secondary source, reference §6; PREVENTT, Lancet 2020, reported smaller
 * differences at surgery), so 2.5 g/L a week from day 7, capped at +20 g/L. Oral: slower and
 * less certain (BSG, Gut 2021), so 1 g/L a week from day 7, capped at +10 g/L. Deliberately
 * modest: over-promising a rise would clear patients who are still anaemic.
 */
export const EXPECTED_HB_RESPONSE = {
  iv: { riseGLPerWeek: 2.5, maxRiseGL: 20, onsetDays: 7 },
  oral: { riseGLPerWeek: 1, maxRiseGL: 10, onsetDays: 7 },
} as const

const DAY_MS = 86_400_000

interface Point {
  day: number
  hbGL: number
  iso: string
}

function fmt(n: number): string {
  return String(Math.round(n * 10) / 10)
}

function leastSquares(points: Point[]): { slope: number; intercept: number } | undefined {
  const n = points.length
  const mx = points.reduce((s, p) => s + p.day, 0) / n
  const my = points.reduce((s, p) => s + p.hbGL, 0) / n
  const sxx = points.reduce((s, p) => s + (p.day - mx) ** 2, 0)
  if (sxx === 0) return undefined
  const slope = points.reduce((s, p) => s + (p.day - mx) * (p.hbGL - my), 0) / sxx
  return { slope, intercept: my - slope * mx }
}

function clampHb(x: number): number {
  return Math.min(CLINICAL_LIMITS.hbGL.max, Math.max(CLINICAL_LIMITS.hbGL.min, x))
}

/** Hb rounded to a whole g/L, as laboratories report it. */
export function roundHbGL(hbGL: number): number {
  return Math.round(hbGL)
}

/** The last millisecond of a date-only target day on the clinic's clocks; instants are kept as given. */
function endOfTargetDay(targetDate: Date | string, timeZone: string | undefined): number {
  const start = requireDate('targetDate', targetDate)
  if (timeZone === undefined || typeof targetDate !== 'string' || !/^\d{4}-\d{2}-\d{2}$/.test(targetDate)) return start
  const next = new Date(start + DAY_MS).toISOString().slice(0, 10)
  return zonedToUtc(next, '00:00', timeZone).getTime() - 1
}

/**
 * Projects Hb (g/L, unrounded) on targetDate (the planned surgery date).
 * - No treatment: the latest value on or before the target ('latest-value').
 * - Treatment with a re-check at least onsetDays after the first dose: least-squares linear
 *   trend through the latest pre-treatment value and all values from the first dose on
 *   ('trend'). The projection is capped at baseline + maxRiseGL (or the highest measured value,
 *   if higher) because the response to iron plateaus. A falling trend is extended as it is,
 *   never floored at the lowest value measured: a fall despite iron must show as a fall.
 * - Treatment without such a re-check: the latest value plus the stated expected rise
 *   between its date and the target ('expected-response'; see EXPECTED_HB_RESPONSE). With the
 *   iron given (totalMg) and the calculated deficit (deficitMg), the rise and its cap are scaled
 *   by the share of the deficit given: 200 mg of a 1 220 mg deficit earns at most a sixth of
 *   the full response. This is an assumption, stated as one; it never counts as evidence.
 * Every assumption is returned in words in `assumptions`.
 */
export function projectHb(input: {
  targetDate: Date | string
  measurements: HbMeasurement[]
  treatment?: HbTreatment
  assumption?: ResponseAssumption
  /**
   * The clinic's calendar (IANA zone) for a date-only targetDate: every sample taken on the
   * target day itself, up to its last minute in that zone, counts (an Hb on the morning of
   * surgery is the best evidence there is). Without it the target is midnight UTC.
   */
  timeZone?: string
}): HbProjection {
  const target = requireDate('targetDate', input.targetDate)
  const cutoff = endOfTargetDay(input.targetDate, input.timeZone)
  if (!Array.isArray(input.measurements) || input.measurements.length === 0) {
    throw new ClinicalInputError('measurements', input.measurements, 'measurements must contain at least one Hb value')
  }
  const all = input.measurements.map((m, i) => {
    const ms = requireDate(`measurements[${i}].takenAt`, m?.takenAt)
    return { ms, hbGL: requireInRange(`measurements[${i}].hbGL`, m.hbGL, CLINICAL_LIMITS.hbGL) }
  })
  const usable = all.filter((m) => m.ms <= cutoff).sort((a, b) => a.ms - b.ms)
  if (usable.length === 0) {
    throw new ClinicalInputError('targetDate', input.targetDate, 'targetDate must not be before the first Hb measurement')
  }
  const toPoint = (m: { ms: number; hbGL: number }): Point => ({
    day: (m.ms - target) / DAY_MS,
    hbGL: m.hbGL,
    iso: input.timeZone ? localDate(new Date(m.ms), input.timeZone) : new Date(m.ms).toISOString().slice(0, 10),
  })
  const points = usable.map(toPoint)
  const latest = points[points.length - 1]
  const latestText = `the latest Hb, ${fmt(latest.hbGL)} g/L on ${latest.iso}`

  if (input.treatment === undefined) {
    return {
      hbGL: latest.hbGL,
      method: 'latest-value',
      assumptions: [`No iron treatment recorded: Hb is assumed to stay at ${latestText}.`],
    }
  }
  const kind = requireOneOf('treatment.kind', input.treatment.kind, ['iv', 'oral'] as const)
  const doseDay = (requireDate('treatment.firstDoseDate', input.treatment.firstDoseDate) - target) / DAY_MS
  const totalMg = optionalInRange('treatment.totalMg', input.treatment.totalMg, CLINICAL_LIMITS.productMaxTotalMg)
  const d = EXPECTED_HB_RESPONSE[kind]
  const a = input.assumption ?? {}
  const rate = optionalInRange('assumption.riseGLPerWeek', a.riseGLPerWeek, CLINICAL_LIMITS.riseGLPerWeek) ?? d.riseGLPerWeek
  const maxRise = optionalInRange('assumption.maxRiseGL', a.maxRiseGL, CLINICAL_LIMITS.maxRiseGL) ?? d.maxRiseGL
  const onset = optionalInRange('assumption.onsetDays', a.onsetDays, CLINICAL_LIMITS.onsetDays) ?? d.onsetDays
  const route = kind === 'iv' ? 'IV' : 'oral'

  if (doseDay > 0) {
    return {
      hbGL: latest.hbGL,
      method: 'latest-value',
      assumptions: [`The ${route} iron starts after the target date, so Hb is assumed to stay at ${latestText}.`],
    }
  }
  const assumptions: string[] = []
  const deficitMg = optionalInRange('treatment.deficitMg', input.treatment.deficitMg, CLINICAL_LIMITS.productMaxTotalMg)
  const doseFraction = totalMg !== undefined && deficitMg !== undefined && deficitMg > 0 ? Math.min(1, totalMg / deficitMg) : undefined

  const pre = points.filter((p) => p.day < doseDay)
  const post = points.filter((p) => p.day >= doseDay)
  const trendPoints = pre.length > 0 ? [pre[pre.length - 1], ...post] : post
  const hasRecheck = post.some((p) => p.day - doseDay >= onset)
  const fit = hasRecheck ? leastSquares(trendPoints) : undefined
  if (fit !== undefined) {
    const baseline = trendPoints[0].hbGL
    const upper = Math.max(baseline + maxRise, ...trendPoints.map((p) => p.hbGL))
    // Days are measured from the target, so the intercept is the value on the target date.
    const hbGL = clampHb(Math.min(upper, fit.intercept))
    const slopeGLPerWeek = fit.slope * 7
    assumptions.push(
      `Linear trend of ${trendPoints.length} Hb values from ${trendPoints[0].iso} to ${latest.iso} (${fmt(slopeGLPerWeek)} g/L ` +
        `per week), extended to the target date.`,
      `Capped at ${fmt(upper)} g/L (baseline ${fmt(baseline)} g/L + ${fmt(maxRise)} g/L, or the highest value measured) because ` +
        `the response to iron levels off.`,
    )
    if (fit.slope < 0)
      assumptions.push(
        'Hb is falling despite iron: the fall is extended to the target date as measured; review for ongoing blood loss or another cause.',
      )
    return { hbGL, method: 'trend', assumptions, slopeGLPerWeek }
  }

  const f = doseFraction ?? 1
  const scaledRate = rate * f
  const scaledMax = maxRise * f
  const rise = (day: number): number => Math.min(scaledMax, Math.max(0, ((day - doseDay - onset) * scaledRate) / 7))
  const hbGL = clampHb(latest.hbGL + rise(0) - rise(latest.day))
  if (doseFraction !== undefined) {
    assumptions.push(
      `${totalMg} mg of iron given against a calculated deficit of ${deficitMg} mg (${Math.round(doseFraction * 100)} %), so ` +
        `the assumed full-course rise is scaled to ${Math.round(doseFraction * 100)} %.`,
    )
  }
  assumptions.push(
    `No Hb re-check yet ${fmt(onset)} or more days after the first ${route} iron dose, so Hb is assumed to rise ` +
      `${fmt(scaledRate)} g/L per week from day ${fmt(onset)} after the first dose, up to +${fmt(scaledMax)} g/L in total, added ` +
      `to ${latestText}.`,
    kind === 'iv'
      ? 'Basis: IV iron typically raises Hb by 10–20 g/L over 4–8 weeks (secondary source); individual responses vary.'
      : 'Basis: oral iron acts more slowly and less surely than IV iron (BSG guideline, Gut 2021); individual responses vary.',
  )
  return { hbGL, method: 'expected-response', assumptions, ...(doseFraction !== undefined ? { doseFraction } : {}) }
}
