import { ClinicalInputError, optionalInRange, requireInRange, requireIntegerInRange, requireOneOf } from './errors'
import { CLINICAL_LIMITS } from './limits'
import { validateDosingTable, type IronDosingTable } from './ironNeed'

/**
 * One formulary entry. Caps are data so a hospital can change them to match its own
 * protocols and the product's current prescribing information.
 */
export interface IronProduct {
  code: string
  name: string
  route: 'iv' | 'oral'
  /** Largest single dose in mg of iron. For oral products, one tablet's elemental iron. */
  maxSingleDoseMg: number
  /** e.g. 20 mg/kg for ferric carboxymaltose by infusion (EU SmPC). */
  maxSingleDoseMgPerKg?: number
  /** Minimum whole days between doses. */
  minIntervalDays: number
  /** Largest total in any 7 consecutive days. */
  maxWeeklyMg?: number
  /** Largest course total. */
  maxTotalMg?: number
  /** Dose step (vial or ampoule size), e.g. 100 or 50 mg; doses are whole multiples. */
  roundToMg?: number
  /** Oral: elemental iron per dose in mg. */
  oralDailyMg?: number
  /** Oral: one dose on alternate days rather than daily. */
  oralAlternateDays?: boolean
  /** Youngest licensed age in years; absent = adults (18 and over) only. */
  licensedFromAgeYears?: number
  /** Under 18: largest single dose per kg and in mg (the label's paediatric posology). */
  paediatricMaxSingleDoseMgPerKg?: number
  paediatricMaxSingleDoseMg?: number
  /** The label's own dosing table; when present the plan uses it instead of Ganzoni. */
  dosingTable?: IronDosingTable
  /** A repeat course needs a serum phosphate first (ferric carboxymaltose: hypophosphataemia). */
  phosphateCheckOnRepeat?: boolean
}

function requireText(input: string, value: unknown): string {
  if (typeof value !== 'string' || value.trim() === '') {
    throw new ClinicalInputError(input, value, `${input} must be a non-empty text (got ${JSON.stringify(value)})`)
  }
  return value
}

/** Checks a formulary entry against CLINICAL_LIMITS; returns it unchanged or throws ClinicalInputError. */
export function validateIronProduct(product: IronProduct): IronProduct {
  if (product === null || typeof product !== 'object') {
    throw new ClinicalInputError('product', product, 'product must be an iron formulary entry')
  }
  requireText('product.code', product.code)
  requireText('product.name', product.name)
  const route = requireOneOf('product.route', product.route, ['iv', 'oral'] as const)
  requireInRange('product.maxSingleDoseMg', product.maxSingleDoseMg, CLINICAL_LIMITS.productMaxSingleDoseMg)
  optionalInRange('product.maxSingleDoseMgPerKg', product.maxSingleDoseMgPerKg, CLINICAL_LIMITS.productMaxSingleDoseMgPerKg)
  requireIntegerInRange('product.minIntervalDays', product.minIntervalDays, CLINICAL_LIMITS.productMinIntervalDays)
  optionalInRange('product.maxWeeklyMg', product.maxWeeklyMg, CLINICAL_LIMITS.productMaxWeeklyMg)
  optionalInRange('product.maxTotalMg', product.maxTotalMg, CLINICAL_LIMITS.productMaxTotalMg)
  optionalInRange('product.roundToMg', product.roundToMg, CLINICAL_LIMITS.productRoundToMg)
  optionalInRange('product.oralDailyMg', product.oralDailyMg, CLINICAL_LIMITS.productOralDailyMg)
  if (route === 'oral' && product.oralDailyMg === undefined) {
    throw new ClinicalInputError(
      'product.oralDailyMg',
      undefined,
      'product.oralDailyMg is required for an oral product (mg elemental iron per dose)',
    )
  }
  if (product.oralAlternateDays !== undefined && typeof product.oralAlternateDays !== 'boolean') {
    throw new ClinicalInputError('product.oralAlternateDays', product.oralAlternateDays, 'product.oralAlternateDays must be true or false')
  }
  optionalInRange('product.licensedFromAgeYears', product.licensedFromAgeYears, { min: 0, max: 18, unit: 'years' })
  optionalInRange(
    'product.paediatricMaxSingleDoseMgPerKg',
    product.paediatricMaxSingleDoseMgPerKg,
    CLINICAL_LIMITS.productMaxSingleDoseMgPerKg,
  )
  optionalInRange('product.paediatricMaxSingleDoseMg', product.paediatricMaxSingleDoseMg, CLINICAL_LIMITS.productMaxSingleDoseMg)
  if (product.dosingTable !== undefined) {
    // The tables in product information give an IV course's cumulative need; oral iron is dosed by the day.
    if (route === 'oral')
      throw new ClinicalInputError(
        'product.dosingTable',
        'oral',
        'An oral product cannot be dosed by a cumulative-need table: switch "dosed by its table" off first',
      )
    validateDosingTable(product.dosingTable)
  }
  return product
}
