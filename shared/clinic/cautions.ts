/**
 * The usual questions before IV iron (common practice; see the product's prescribing
 * information). Each must be answered; a "yes" blocks unless the doctor records why.
 */
export const IV_IRON_CAUTIONS = [
  { key: 'previousHypersensitivity', question: 'Previous hypersensitivity reaction to IV iron?' },
  { key: 'activeInfection', question: 'Active infection (bacteraemia) now?' },
  { key: 'firstTrimester', question: 'In the first trimester of pregnancy?' },
  { key: 'severeLiverDisease', question: 'Severe liver disease (decompensated cirrhosis, hepatitis)?' },
] as const

export type CautionKey = (typeof IV_IRON_CAUTIONS)[number]['key']
export type CautionAnswers = Record<CautionKey, boolean>

export function positiveCautions(answers: CautionAnswers): CautionKey[] {
  return IV_IRON_CAUTIONS.filter((c) => answers[c.key]).map((c) => c.key)
}
