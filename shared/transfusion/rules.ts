/**
 * Transfusion record rules shared by the form and the server. Safety-critical: the threshold
 * decides whether a red-cell unit needs a written reason (hazard: a unit given above the
 * patient's threshold without anyone saying why).
 */

export const COMPONENTS = ['red-cells', 'platelets', 'plasma', 'cryoprecipitate'] as const
export type Component = (typeof COMPONENTS)[number]
export const COMPONENT_LABELS: Record<Component, string> = {
  'red-cells': 'Red cells',
  platelets: 'Platelets',
  plasma: 'Plasma',
  cryoprecipitate: 'Cryoprecipitate',
}

/** When in the admission the component was given; drives the post-operative record's unit counts. */
export const PHASES = ['before-surgery', 'during-surgery', 'after-surgery'] as const
export type Phase = (typeof PHASES)[number]
export const PHASE_LABELS: Record<Phase, string> = {
  'before-surgery': 'Before surgery',
  'during-surgery': 'During surgery',
  'after-surgery': 'After surgery',
}

export const MAX_UNITS = 20

export const THRESHOLD_SOURCE = 'AABB 2023 international guidelines (Carson et al., JAMA 2023;330:1892)'

export interface ThresholdInput {
  specialty: string
  cardiovascularDisease: boolean
}
export interface Threshold {
  thresholdGL: number
  basis: string
}

/**
 * The restrictive red-cell threshold for a haemodynamically stable adult (AABB 2023,
 * Recommendation 1): 7 g/dL; "a threshold of 7.5 g/dL for patients undergoing cardiac surgery
 * and 8 g/dL for those undergoing orthopedic surgery or those with preexisting cardiovascular
 * disease". Cardiac surgery is checked first: the cardiac-surgery figure was set in trials of
 * patients who mostly had cardiovascular disease (common practice reading of the guideline).
 */
export function transfusionThreshold(input: ThresholdInput): Threshold {
  const s = input.specialty.toLowerCase()
  if (s.includes('cardiac')) return { thresholdGL: 75, basis: `Cardiac surgery: 75 g/L (${THRESHOLD_SOURCE})` }
  if (s.includes('orthop')) return { thresholdGL: 80, basis: `Orthopaedic surgery: 80 g/L (${THRESHOLD_SOURCE})` }
  if (input.cardiovascularDisease) return { thresholdGL: 80, basis: `Cardiovascular disease: 80 g/L (${THRESHOLD_SOURCE})` }
  return { thresholdGL: 70, basis: `Stable adult inpatient: 70 g/L (${THRESHOLD_SOURCE})` }
}

/** A pre-transfusion Hb above the threshold needs a reason; at the threshold it does not. */
export function aboveThreshold(preTransfusionHbGL: number | null | undefined, threshold: Threshold): boolean {
  return preTransfusionHbGL != null && preTransfusionHbGL > threshold.thresholdGL
}

/**
 * ISBT 128 Product Code (data structure 003, the eight characters after "=<"): a Product
 * Description Code (one capital letter and four digits), the type of donation (one letter or
 * digit) and two division characters (a capital letter or 0, then a small letter or 0). The
 * layout is from memory of the ICCBBA technical specification (ST-001), which is licensed and
 * could not be checked here; it checks the format only, never that a code exists.
 */
export const ISBT128_PRODUCT_CODE = /^[A-Z]\d{4}[A-Z0-9][A-Z0][a-z0]$/

export function isIsbt128ProductCode(v: string): boolean {
  return ISBT128_PRODUCT_CODE.test(v)
}

/** Before, during or after surgery, from the date when the caller does not say. */
export function defaultPhase(givenAtIso: string, surgeryDate: string): Phase {
  return givenAtIso.slice(0, 10) < surgeryDate ? 'before-surgery' : 'after-surgery'
}

/**
 * QS138 statement 3 counted per red-cell transfusion: a single unit, with the patient
 * clinically reassessed and a post-transfusion Hb checked before anything more was given.
 */
export function reassessedAfterEachUnit(row: {
  component: Component
  units: number
  reassessedBeforeNext: boolean
  postTransfusionHbGL: number | null
}): boolean {
  return row.component === 'red-cells' && row.units === 1 && row.reassessedBeforeNext && row.postTransfusionHbGL != null
}
