import type { IronStatus, Sex } from '../clinical'

/** One prompt on the clinic review: what to think of, why, and where the rule comes from. */
export interface WorkupPrompt {
  key: 'b12-deficiency' | 'folate-deficiency' | 'kidney-disease' | 'other-cause' | 'gi-investigation'
  title: string
  detail: string
  source: string
}

export interface WorkupInput {
  sex: Sex
  ageYears: number
  anaemic: boolean | null
  ironStatus: IronStatus | null
  /** Latest values in canonical units; null when not measured. */
  b12NgL: number | null
  folateUgL: number | null
  egfr: number | null
  mcvFl: number | null
}

// Serum cobalamin < 148 pmol/L (200 ng/L) and serum folate < 7 nmol/L (3 µg/L): BSH guideline
// (Devalia et al., Br J Haematol 2014;166:496), which asks for local reference ranges.
export const B12_LOW_NG_L = 200
export const FOLATE_LOW_UG_L = 3
/** CKD stage G3a starts below 60 mL/min/1.73 m² (KDIGO). */
export const EGFR_KIDNEY_ANAEMIA = 60
/** Macrocytosis above the usual adult range (common practice: MCV > 100 fL). */
export const MACROCYTOSIS_FL = 100
/** Taken as post-menopausal for the GI prompt when no menstrual history is recorded (local policy). */
export const POST_MENOPAUSAL_AGE = 50

const BSH_B12 =
  'BSH guideline on cobalamin and folate disorders (Devalia et al., Br J Haematol 2014;166:496); check the local reference range'
const KDIGO = 'KDIGO Clinical Practice Guideline for Anemia in CKD (Kidney Int Suppl 2012;2:279); the referral threshold is local policy'
const MUNOZ =
  'International consensus on peri-operative anaemia (Muñoz et al., Anaesthesia 2017;72:233): anaemia without iron deficiency ' +
  'needs other causes sought'
const BSG =
  'BSG guidelines for iron deficiency anaemia in adults (Snook et al., Gut 2021;70:2030): bidirectional endoscopy for men and ' +
  'post-menopausal women without an obvious cause'

/**
 * Anaemia work-up prompts for the clinic review. Pure: the review panel shows each with its
 * source. They are prompts for a clinician, not diagnoses.
 */
export function workupPrompts(input: WorkupInput): WorkupPrompt[] {
  const out: WorkupPrompt[] = []
  if (input.b12NgL !== null && input.b12NgL < B12_LOW_NG_L) {
    out.push({
      key: 'b12-deficiency',
      title: 'Low vitamin B12',
      detail: `B12 ${input.b12NgL} ng/L is below ${B12_LOW_NG_L} ng/L: consider B12 deficiency as a cause or a contributor, and treat it.`,
      source: BSH_B12,
    })
  }
  if (input.folateUgL !== null && input.folateUgL < FOLATE_LOW_UG_L) {
    out.push({
      key: 'folate-deficiency',
      title: 'Low folate',
      detail:
        `Folate ${input.folateUgL} µg/L is below ${FOLATE_LOW_UG_L} µg/L: consider folate deficiency; check B12 before giving ` +
        `folic acid.`,
      source: BSH_B12,
    })
  }
  if (!input.anaemic) return out
  if (input.egfr !== null && input.egfr < EGFR_KIDNEY_ANAEMIA) {
    out.push({
      key: 'kidney-disease',
      title: 'Anaemia with reduced kidney function',
      detail:
        `eGFR ${input.egfr} mL/min/1.73 m² is below ${EGFR_KIDNEY_ANAEMIA}: consider anaemia of chronic kidney disease and a ` +
        `nephrology opinion.`,
      source: KDIGO,
    })
  }
  const macro = input.mcvFl !== null && input.mcvFl > MACROCYTOSIS_FL
  if (macro || input.ironStatus === 'replete') {
    const why = macro ? `MCV ${input.mcvFl} fL is above ${MACROCYTOSIS_FL} fL (macrocytosis)` : 'iron studies are normal'
    out.push({
      key: 'other-cause',
      title: 'Anaemia not explained by iron',
      detail: `Anaemic and ${why}: look for other causes and consider a haematology referral.`,
      source: MUNOZ,
    })
  }
  if (input.ironStatus === 'absolute-deficiency') {
    const atRisk = input.sex === 'male' || input.ageYears >= POST_MENOPAUSAL_AGE
    out.push({
      key: 'gi-investigation',
      title: 'Iron-deficiency anaemia: find the cause',
      detail: atRisk
        ? `Iron-deficiency anaemia in a ` +
          `${input.sex === 'male' ? 'man' : `woman aged ${input.ageYears} (taken as post-menopausal)`}: unless a cause is known, ` +
          `refer for gastrointestinal investigation (upper and lower endoscopy) and test for coeliac disease.`
        : 'Iron-deficiency anaemia: unless a cause is known (such as heavy periods), consider gastrointestinal investigation and ' +
          'test for coeliac disease.',
      source: BSG,
    })
  }
  return out
}
