import { requireDate, requireInRange } from './errors'
import { ganzoniIronDeficit } from './iron'
import { validateIronProduct } from './ironProduct'
import type { IronProduct } from './ironProduct'
import { CLINICAL_LIMITS } from './limits'

export type IronDoseCap = 'maxSingleDoseMg' | 'maxSingleDoseMgPerKg' | 'maxWeeklyMg' | 'maxTotalMg' | 'roundToMg'

export interface IronDose {
  number: number
  doseMg: number
  /** Days from the first dose (first dose = 0). */
  dayOffset: number
  /** ISO date (YYYY-MM-DD, UTC) when a startDate was given. */
  date?: string
  /** Caps that limited this dose's size or pushed its date later. */
  cappedBy: IronDoseCap[]
}

export interface IronDosePlan {
  productCode: string
  route: 'iv' | 'oral'
  deficitMg: number
  /** Total to give: the deficit, capped by maxTotalMg and rounded to the dose step. */
  totalMg: number
  doses: IronDose[]
  appliedCaps: {
    perDoseLimitMg: number
    perDoseLimitedBy: IronDoseCap[]
    totalCappedAtMg: number | null
    weeklyLimitMg: number | null
    minIntervalDays: number
    roundToMg: number
  }
  oralSchedule?: { elementalMgPerDose: number; alternateDays: boolean; description: string }
  warnings: string[]
}

const MANY_DOSES = 4
const DAY_MS = 86_400_000

function perDoseLimit(product: IronProduct, weightKg: number, step: number): { limit: number; by: IronDoseCap[] } {
  const candidates: [IronDoseCap, number][] = [['maxSingleDoseMg', product.maxSingleDoseMg]]
  if (product.maxSingleDoseMgPerKg !== undefined) candidates.push(['maxSingleDoseMgPerKg', product.maxSingleDoseMgPerKg * weightKg])
  // A single dose can never exceed what may be given in a whole week.
  if (product.maxWeeklyMg !== undefined) candidates.push(['maxWeeklyMg', product.maxWeeklyMg])
  const raw = Math.min(...candidates.map(([, v]) => v))
  const by = candidates.filter(([, v]) => v === raw).map(([k]) => k)
  const limit = Math.floor(raw / step + 1e-9) * step
  if (limit < raw) by.push('roundToMg')
  return { limit, by }
}

// Earliest day ≥ from at which the dose keeps every 7-consecutive-day total within the cap.
function earliestDay(from: number, doseMg: number, given: IronDose[], weeklyMg: number | undefined): number {
  if (weeklyMg === undefined) return from
  let day = from
  for (;;) {
    const inWindow = given.filter((d) => d.dayOffset > day - 7).reduce((sum, d) => sum + d.doseMg, 0)
    if (inWindow + doseMg <= weeklyMg) return day
    day += 1
  }
}

function isoDay(startMs: number, offset: number): string {
  return new Date(startMs + offset * DAY_MS).toISOString().slice(0, 10)
}

function oralSchedule(product: IronProduct): NonNullable<IronDosePlan['oralSchedule']> {
  const mg = product.oralDailyMg as number
  const alternateDays = product.oralAlternateDays ?? true
  const description = alternateDays
    ? `${mg} mg elemental iron once on alternate days (Stoffel, Lancet Haematol 2017; BSG guideline, Gut 2021)`
    : `${mg} mg elemental iron once daily (BSG guideline, Gut 2021: one tablet daily, alternate days if not tolerated)`
  return { elementalMgPerDose: mg, alternateDays, description }
}

/**
 * A dosing plan for one formulary product. Total = Ganzoni deficit (Ganzoni 1970, see
 * ganzoniIronDeficit), capped by maxTotalMg, rounded to the nearest dose step (or down, if
 * rounding up would pass maxTotalMg). Each IV dose = min(remaining, maxSingleDoseMg,
 * maxSingleDoseMgPerKg × weight, maxWeeklyMg) rounded down to roundToMg; doses are spaced by
 * minIntervalDays and later if needed so no 7 consecutive days exceed maxWeeklyMg.
 * Oral products get a schedule description (no dose list) and a warning about time to effect.
 * Throws ClinicalInputError for invalid patient values or formulary data.
 */
export function ironDosePlan(input: {
  product: IronProduct
  weightKg: number
  hbGL: number
  targetHbGL: number
  startDate?: Date | string
}): IronDosePlan {
  const product = validateIronProduct(input.product)
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  const targetHbGL = requireInRange('targetHbGL', input.targetHbGL, CLINICAL_LIMITS.hbGL)
  const startMs = input.startDate === undefined ? undefined : requireDate('startDate', input.startDate)
  const deficitMg = ganzoniIronDeficit({ weightKg, hbGL, targetHbGL })
  const step = product.roundToMg ?? 1
  const warnings: string[] = []

  if (hbGL >= targetHbGL) warnings.push(`Hb ${hbGL} g/L is at or above the target ${targetHbGL} g/L: the deficit is iron stores only.`)
  if (weightKg < 35) {
    warnings.push(`Weight ${weightKg} kg is under 35 kg: Ganzoni stores are 15 mg/kg and adult dose caps may not apply; check the prescribing information.`)
  } else if (weightKg > 120) {
    warnings.push(`Weight ${weightKg} kg is above 120 kg: the deficit uses the weight given; prescribing information suggests ideal body weight in obesity.`)
  }

  const cappedTotal = product.maxTotalMg !== undefined ? Math.min(deficitMg, product.maxTotalMg) : deficitMg
  if (cappedTotal < deficitMg) warnings.push(`Total capped at ${product.maxTotalMg} mg (product maximum), below the calculated deficit of ${deficitMg} mg.`)
  let totalMg = Math.round(cappedTotal / step) * step
  if (totalMg > cappedTotal && product.maxTotalMg !== undefined && totalMg > product.maxTotalMg) totalMg -= step
  if (totalMg !== cappedTotal && totalMg > 0) warnings.push(`Total rounded to ${totalMg} mg (dose step ${step} mg) from ${cappedTotal} mg.`)

  const { limit, by } = perDoseLimit(product, weightKg, step)
  const appliedCaps = {
    perDoseLimitMg: limit,
    perDoseLimitedBy: by,
    totalCappedAtMg: cappedTotal < deficitMg ? cappedTotal : null,
    weeklyLimitMg: product.maxWeeklyMg ?? null,
    minIntervalDays: product.minIntervalDays,
    roundToMg: step,
  }
  const base = { productCode: product.code, route: product.route, deficitMg, appliedCaps, warnings }

  if (product.route === 'oral') {
    warnings.push(
      'Oral iron needs weeks: a rise of at least 10 g/L by 2 weeks counts as a response (BSG, Gut 2021) and refilling stores takes months; if surgery is under about 4–6 weeks away, consider IV iron (ASH 2019; NICE NG24).',
    )
    return { ...base, totalMg: cappedTotal, doses: [], oralSchedule: oralSchedule(product) }
  }
  if (totalMg <= 0 || limit <= 0) {
    warnings.push(limit <= 0 ? `The per-dose limit is below one dose step (${step} mg): no dose can be planned.` : 'The deficit is below half a dose step: no dose planned.')
    return { ...base, totalMg: Math.max(0, totalMg), doses: [] }
  }

  const doses: IronDose[] = []
  let remaining = totalMg
  let nextEarliest = 0
  while (remaining > 0) {
    const doseMg = Math.min(remaining, limit)
    const day = earliestDay(nextEarliest, doseMg, doses, product.maxWeeklyMg)
    const cappedBy: IronDoseCap[] = doseMg < remaining ? [...by] : []
    if (day > nextEarliest && !cappedBy.includes('maxWeeklyMg')) cappedBy.push('maxWeeklyMg')
    const dose: IronDose = { number: doses.length + 1, doseMg, dayOffset: day, cappedBy }
    if (startMs !== undefined) dose.date = isoDay(startMs, day)
    doses.push(dose)
    remaining -= doseMg
    nextEarliest = day + product.minIntervalDays
  }

  if (doses.length > 1) warnings.push(`The total of ${totalMg} mg exceeds the per-dose limit of ${limit} mg (${by.join(', ')}): given as ${doses.length} doses.`)
  if (doses.length > MANY_DOSES) warnings.push(`${doses.length} doses are needed: consider a product allowing larger single doses.`)
  return { ...base, totalMg, doses }
}
