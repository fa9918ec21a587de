import { ClinicalInputError, requireInRange } from './errors'
import { ganzoniIronDeficit, GANZONI_LOW_WEIGHT_KG } from './iron'
import { CLINICAL_LIMITS } from './limits'
import type { Sex } from './types'

/**
 * A product's own dosing table (weight band × Hb band → cumulative iron need in mg), as its
 * product information prints it. Bands are lower edges, ascending, the first 0:
 * weightBandsKg [0, 35, 70] means <35, 35–<70, ≥70 kg.
 */
export interface IronDosingTable {
  weightBandsKg: number[]
  hbBandsGL: number[]
  /** needMg[hbBand][weightBand] */
  needMg: number[][]
  /** Where the table comes from (product information, section and date). */
  source: string
}

function ascendingFromZero(name: string, bands: unknown): number[] {
  if (
    !Array.isArray(bands) ||
    bands.length < 1 ||
    bands[0] !== 0 ||
    bands.some((b, i) => typeof b !== 'number' || !Number.isFinite(b) || (i > 0 && b <= (bands[i - 1] as number)))
  ) {
    throw new ClinicalInputError(name, bands, `${name} must be ascending lower band edges starting at 0`)
  }
  return bands as number[]
}

/** Checks a dosing table's shape and values; returns it or throws ClinicalInputError. */
export function validateDosingTable(table: IronDosingTable): IronDosingTable {
  if (table === null || typeof table !== 'object')
    throw new ClinicalInputError('product.dosingTable', table, 'product.dosingTable must be a table')
  const w = ascendingFromZero('product.dosingTable.weightBandsKg', table.weightBandsKg)
  const h = ascendingFromZero('product.dosingTable.hbBandsGL', table.hbBandsGL)
  if (
    !Array.isArray(table.needMg) ||
    table.needMg.length !== h.length ||
    table.needMg.some((row) => !Array.isArray(row) || row.length !== w.length)
  ) {
    throw new ClinicalInputError(
      'product.dosingTable.needMg',
      table.needMg,
      `product.dosingTable.needMg must have ${h.length} rows (Hb bands) of ${w.length} values (weight bands)`,
    )
  }
  table.needMg.flat().forEach((v) => requireInRange('product.dosingTable.needMg', v, CLINICAL_LIMITS.productMaxTotalMg))
  if (typeof table.source !== 'string' || table.source.trim() === '')
    throw new ClinicalInputError('product.dosingTable.source', table.source, 'product.dosingTable.source must name the product information')
  return table
}

const band = (edges: number[], x: number) => edges.reduce((found, edge, i) => (x >= edge ? i : found), 0)

/** The need in mg read from a product's table. */
export function tableNeedMg(table: IronDosingTable, weightKg: number, hbGL: number): number {
  return table.needMg[band(table.hbBandsGL, hbGL)]![band(table.weightBandsKg, weightKg)]!
}

/** Ideal body weight in kg by Devine (1974): men 50, women 45.5, + 2.3 kg per inch over 5 feet (common practice). */
export function idealBodyWeightKg(sex: Sex, heightCm: number): number {
  const h = requireInRange('heightCm', heightCm, CLINICAL_LIMITS.heightCm)
  return Math.max(CLINICAL_LIMITS.weightKg.min, (sex === 'male' ? 50 : 45.5) + (2.3 * (h - 152.4)) / 2.54)
}

/** Ganzoni target under 35 kg: 130 g/L (iron sucrose SmPC 4.2: "Below 35 kg BW: target Hb = 13 g/dl"). */
export const LOW_WEIGHT_TARGET_HB_GL = 130
export const OBESITY_BMI = 30

export interface IronNeed {
  needMg: number
  method: 'ganzoni' | 'product-table'
  /** What a clinician reads: the method, the weight and target used, and why. */
  methodName: string
  dosingWeightKg: number
  weightBasis: 'actual' | 'ideal'
  targetHbGL: number
  warnings: string[]
}

/**
 * The cumulative iron need. With a product table, the table's figure (by actual weight, as the
 * label prints it). Otherwise Ganzoni with: ideal body weight when BMI ≥ 30 (the labels assume
 * a normal weight/blood-volume relationship; iron sits in lean tissue), and target 130 g/L
 * under 35 kg (iron sucrose SmPC). Without a height, obesity cannot be judged: said so.
 */
export function ironNeed(input: {
  weightKg: number
  heightCm?: number | null
  sex?: Sex
  hbGL: number
  targetHbGL: number
  table?: IronDosingTable
}): IronNeed {
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  const warnings: string[] = []
  if (input.table) {
    const table = validateDosingTable(input.table)
    return {
      needMg: tableNeedMg(table, weightKg, hbGL),
      method: 'product-table',
      dosingWeightKg: weightKg,
      weightBasis: 'actual',
      targetHbGL: input.targetHbGL,
      warnings,
      methodName: `Product dosing table (${table.source}) at ${weightKg} kg and Hb ${hbGL} g/L`,
    }
  }
  let dosingWeightKg = weightKg
  let weightBasis: IronNeed['weightBasis'] = 'actual'
  if (input.heightCm != null && input.sex) {
    const bmi = weightKg / (input.heightCm / 100) ** 2
    const ibw = Math.round(idealBodyWeightKg(input.sex, input.heightCm) * 10) / 10
    if (bmi >= OBESITY_BMI && ibw < weightKg) {
      dosingWeightKg = ibw
      weightBasis = 'ideal'
      warnings.push(
        `BMI ${Math.round(bmi)} (≥ ${OBESITY_BMI}): the deficit uses ideal body weight ${ibw} kg (Devine), not the actual ${weightKg} kg.`,
      )
    }
  } else if (weightKg > 100) {
    warnings.push(`No height is recorded, so obesity cannot be judged: the deficit uses the actual ${weightKg} kg. Record a height.`)
  }
  let targetHbGL = requireInRange('targetHbGL', input.targetHbGL, CLINICAL_LIMITS.hbGL)
  if (weightKg < GANZONI_LOW_WEIGHT_KG && targetHbGL > LOW_WEIGHT_TARGET_HB_GL) {
    targetHbGL = LOW_WEIGHT_TARGET_HB_GL
    warnings.push(`Under ${GANZONI_LOW_WEIGHT_KG} kg the Ganzoni target is ${LOW_WEIGHT_TARGET_HB_GL} g/L (iron sucrose SmPC 4.2).`)
  }
  return {
    needMg: ganzoniIronDeficit({ weightKg: dosingWeightKg, hbGL, targetHbGL }),
    method: 'ganzoni',
    dosingWeightKg,
    weightBasis,
    targetHbGL,
    warnings,
    methodName: `Ganzoni 1970: ${dosingWeightKg} kg (${weightBasis} weight) × (${targetHbGL} − ${hbGL} g/L) × 0.24 + iron stores`,
  }
}
