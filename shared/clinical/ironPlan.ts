import { ClinicalInputError, requireDate, requireInRange } from './errors'
import { ironNeed, type IronNeed } from './ironNeed'
import { surgeryTiming, type SurgeryTiming } from './ironTiming'
import { validateIronProduct } from './ironProduct'
import type { IronProduct } from './ironProduct'
import { CLINICAL_LIMITS } from './limits'
import type { Sex } from './types'

export type IronDoseCap =
  | 'maxSingleDoseMg'
  | 'maxSingleDoseMgPerKg'
  | 'paediatricMaxSingleDoseMg'
  | 'paediatricMaxSingleDoseMgPerKg'
  | 'maxWeeklyMg'
  | 'maxTotalMg'
  | 'roundToMg'

/** A plan the formulary does not allow (e.g. a child and a product not licensed for the age). */
export class IronPlanRefusal extends ClinicalInputError {
  constructor(
    input: string,
    value: unknown,
    message: string,
    readonly code: string,
  ) {
    super(input, value, message)
  }
}

export const ADULT_AGE_YEARS = 18

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
  /** How the need was found: Ganzoni (which weight, which target) or the product's own table. */
  method: Pick<IronNeed, 'method' | 'methodName' | 'dosingWeightKg' | 'weightBasis' | 'targetHbGL'>
  /** Present when a surgery date was given. */
  timing?: Omit<SurgeryTiming, 'warnings'>
  /** Under 18 and licensed: the paediatric caps were applied. */
  paediatric: boolean
  warnings: string[]
}

const MANY_DOSES = 4
const DAY_MS = 86_400_000

function perDoseLimit(product: IronProduct, weightKg: number, step: number, paediatric = false): { limit: number; by: IronDoseCap[] } {
  const candidates: [IronDoseCap, number][] = [['maxSingleDoseMg', product.maxSingleDoseMg]]
  if (product.maxSingleDoseMgPerKg !== undefined) candidates.push(['maxSingleDoseMgPerKg', product.maxSingleDoseMgPerKg * weightKg])
  if (paediatric && product.paediatricMaxSingleDoseMg !== undefined)
    candidates.push(['paediatricMaxSingleDoseMg', product.paediatricMaxSingleDoseMg])
  if (paediatric && product.paediatricMaxSingleDoseMgPerKg !== undefined)
    candidates.push(['paediatricMaxSingleDoseMgPerKg', product.paediatricMaxSingleDoseMgPerKg * weightKg])
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

/** Refuses a child unless the product is licensed for the age; true when paediatric caps apply. */
export function paediatricCheck(product: IronProduct, ageYears: number | undefined): boolean {
  if (ageYears === undefined || ageYears >= ADULT_AGE_YEARS) return false
  const from = product.licensedFromAgeYears
  if (from === undefined || ageYears < from) {
    throw new IronPlanRefusal(
      'ageYears',
      ageYears,
      `${product.name} is not marked as licensed at age ${Math.floor(ageYears)} ` +
        `(${from === undefined ? 'adults only' : `from ${from} years`}): no plan. Choose a product licensed for children or seek ` +
        `paediatric advice.`,
      'not_licensed_for_age',
    )
  }
  return true
}

/**
 * A dosing plan for one formulary product. Need = the product's own dosing table when the
 * formulary gives one, else Ganzoni (see ironNeed: ideal weight when BMI ≥ 30, target 130 g/L
 * under 35 kg), capped by maxTotalMg, rounded to the nearest dose step (or down, if rounding
 * up would pass maxTotalMg). Each IV dose = min(remaining, maxSingleDoseMg, maxSingleDoseMgPerKg
 * × weight, maxWeeklyMg, and under 18 the paediatric caps) rounded down to roundToMg; doses are
 * spaced by minIntervalDays and later if needed so no 7 consecutive days exceed maxWeeklyMg.
 * With a surgery date, doses on or after it are left out and the timing cautions are added.
 * Under 18 the product must be licensed for the age (IronPlanRefusal otherwise).
 * Throws ClinicalInputError for invalid patient values or formulary data.
 */
export function ironDosePlan(input: {
  product: IronProduct
  weightKg: number
  hbGL: number
  targetHbGL: number
  startDate?: Date | string
  heightCm?: number | null
  sex?: Sex
  ageYears?: number
  /** ISO date (YYYY-MM-DD) of the planned operation. */
  surgeryDate?: string
}): IronDosePlan {
  const product = validateIronProduct(input.product)
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  requireInRange('targetHbGL', input.targetHbGL, CLINICAL_LIMITS.hbGL)
  const startMs = input.startDate === undefined ? undefined : requireDate('startDate', input.startDate)
  const paediatric = paediatricCheck(product, input.ageYears)
  const need = ironNeed({
    weightKg,
    heightCm: input.heightCm,
    sex: input.sex,
    hbGL,
    targetHbGL: input.targetHbGL,
    table: product.dosingTable,
  })
  const { needMg: deficitMg, targetHbGL } = need
  const step = product.roundToMg ?? 1
  const warnings: string[] = [...need.warnings]

  if (need.method === 'ganzoni' && hbGL >= targetHbGL)
    warnings.push(`Hb ${hbGL} g/L is at or above the target ${targetHbGL} g/L: the deficit is iron stores only.`)
  if (paediatric)
    warnings.push(
      `Age ${Math.floor(input.ageYears!)}: paediatric caps from the formulary apply; check the dose with the product ` +
        `information for children.`,
    )
  // A product table prints its own figure under 35 kg; only Ganzoni changes its stores there.
  if (weightKg < 35)
    warnings.push(
      `Weight ${weightKg} kg is under 35 kg: ${need.method === 'ganzoni' ? 'Ganzoni stores are 15 mg/kg and ' : ''}adult dose ` +
        `caps may not apply; check the prescribing information.`,
    )

  const cappedTotal = product.maxTotalMg !== undefined ? Math.min(deficitMg, product.maxTotalMg) : deficitMg
  if (cappedTotal < deficitMg)
    warnings.push(`Total capped at ${product.maxTotalMg} mg (product maximum), below the calculated need of ${deficitMg} mg.`)
  let totalMg = Math.round(cappedTotal / step) * step
  if (totalMg > cappedTotal && product.maxTotalMg !== undefined && totalMg > product.maxTotalMg) totalMg -= step
  if (totalMg !== cappedTotal && totalMg > 0) warnings.push(`Total rounded to ${totalMg} mg (dose step ${step} mg) from ${cappedTotal} mg.`)

  const { limit, by } = perDoseLimit(product, weightKg, step, paediatric)
  const appliedCaps = {
    perDoseLimitMg: limit,
    perDoseLimitedBy: by,
    totalCappedAtMg: cappedTotal < deficitMg ? cappedTotal : null,
    weeklyLimitMg: product.maxWeeklyMg ?? null,
    minIntervalDays: product.minIntervalDays,
    roundToMg: step,
  }
  const method = {
    method: need.method,
    methodName: need.methodName,
    dosingWeightKg: need.dosingWeightKg,
    weightBasis: need.weightBasis,
    targetHbGL,
  }
  const base = { productCode: product.code, route: product.route, deficitMg, appliedCaps, method, paediatric, warnings }

  if (product.route === 'oral') {
    warnings.push(
      'Oral iron needs weeks: a rise of at least 10 g/L by 2 weeks counts as a response (BSG, Gut 2021) and refilling stores ' +
        'takes months; if surgery is under about 4–6 weeks away, consider IV iron (ASH 2019; NICE NG24).',
    )
    return { ...base, totalMg: cappedTotal, doses: [], oralSchedule: oralSchedule(product) }
  }
  if (totalMg <= 0 || limit <= 0) {
    warnings.push(
      limit <= 0
        ? `The per-dose limit is below one dose step (${step} mg): no dose can be planned.`
        : 'The deficit is below half a dose step: no dose planned.',
    )
    return { ...base, totalMg: Math.max(0, totalMg), doses: [] }
  }

  let doses: IronDose[] = []
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

  if (doses.length > 1)
    warnings.push(
      `The total of ${totalMg} mg exceeds the per-dose limit of ${limit} mg (${by.join(', ')}): given as ${doses.length} doses.`,
    )
  if (doses.length > MANY_DOSES) warnings.push(`${doses.length} doses are needed: consider a product allowing larger single doses.`)
  let timing: IronDosePlan['timing']
  if (input.surgeryDate !== undefined && startMs !== undefined) {
    const { warnings: timingWarnings, ...rest } = surgeryTiming({
      doses,
      firstDoseDate: isoDay(startMs, 0),
      surgeryDate: input.surgeryDate,
      route: product.route,
    })
    timing = rest
    warnings.unshift(...timingWarnings)
    doses = doses.filter((d) => !rest.afterSurgery.includes(d))
    totalMg = doses.reduce((s, d) => s + d.doseMg, 0)
  }
  return { ...base, totalMg, doses, ...(timing ? { timing } : {}) }
}
