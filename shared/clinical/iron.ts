import { optionalInRange, requireInRange } from './errors'
import { CLINICAL_LIMITS } from './limits'

// 0.24 = 0.0034 (Fe per g Hb) × 0.07 (blood volume, L/kg) × 10 000 / 10 for Hb in g/L
// (Ganzoni's 2.4 is for g/dL). Stores: 500 mg, or 15 mg/kg below 35 kg (product SmPCs).
export const GANZONI_FACTOR_G_L = 0.24
export const GANZONI_STORES_MG = 500
export const GANZONI_STORES_MG_PER_KG_UNDER_35 = 15
export const GANZONI_LOW_WEIGHT_KG = 35

export function ganzoniStoresMg(weightKg: number): number {
  return weightKg < GANZONI_LOW_WEIGHT_KG ? GANZONI_STORES_MG_PER_KG_UNDER_35 * weightKg : GANZONI_STORES_MG
}

/**
 * Total iron deficit in mg by Ganzoni AM, Schweiz Med Wochenschr 1970;100:301 (formula as in
 * the iron products' SmPCs): weight (kg) × (target − actual Hb, g/L) × 0.24 + iron stores.
 * Stores default to 500 mg, or 15 mg/kg under 35 kg. When Hb is at or above the target only
 * the stores are returned (never a negative deficit). Rounded to the nearest mg.
 * SmPCs suggest ideal rather than actual weight in obesity (secondary source); the caller
 * chooses which weight to pass.
 */
export function ganzoniIronDeficit(input: { weightKg: number; hbGL: number; targetHbGL: number; ironStoresMg?: number }): number {
  const weightKg = requireInRange('weightKg', input.weightKg, CLINICAL_LIMITS.weightKg)
  const hbGL = requireInRange('hbGL', input.hbGL, CLINICAL_LIMITS.hbGL)
  const targetHbGL = requireInRange('targetHbGL', input.targetHbGL, CLINICAL_LIMITS.hbGL)
  const stores = optionalInRange('ironStoresMg', input.ironStoresMg, CLINICAL_LIMITS.ironStoresMg) ?? ganzoniStoresMg(weightKg)
  const haemoglobinIron = weightKg * Math.max(0, targetHbGL - hbGL) * GANZONI_FACTOR_G_L
  return Math.round(haemoglobinIron + stores)
}

/**
 * Cumulative iron need in mg for ferric carboxymaltose from the simplified table of its EU
 * SmPC (reference §6, label text): Hb <100 g/L → 500 / 1500 / 2000 mg for weight <35 /
 * 35–<70 / ≥70 kg; Hb 100–<140 g/L → 500 / 1000 / 1500 mg; Hb ≥140 g/L → 500 mg.
 */
export function fcmSimplifiedNeedMg({ weightKg, hbGL }: { weightKg: number; hbGL: number }): number {
  const w = requireInRange('weightKg', weightKg, CLINICAL_LIMITS.weightKg)
  const hb = requireInRange('hbGL', hbGL, CLINICAL_LIMITS.hbGL)
  if (w < 35 || hb >= 140) return 500
  if (hb < 100) return w < 70 ? 1500 : 2000
  return w < 70 ? 1000 : 1500
}
