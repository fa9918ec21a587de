/** Biological sex as used by the published equations (blood volume, eGFR, WHO cut-offs). */
export type Sex = 'female' | 'male'

export type HbUnit = 'g/L' | 'g/dL' | 'mmol/L'
