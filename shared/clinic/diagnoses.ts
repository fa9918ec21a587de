/** Working diagnoses a clinic doctor records; identifiers stable, labels in our words. */
export const DIAGNOSES = ['absolute-iron-deficiency', 'iron-restricted', 'b12-folate', 'kidney-disease', 'other'] as const
export type Diagnosis = (typeof DIAGNOSES)[number]

export const DIAGNOSIS_LABELS: Record<Diagnosis, string> = {
  'absolute-iron-deficiency': 'Absolute iron deficiency',
  'iron-restricted': 'Iron-restricted, with inflammation',
  'b12-folate': 'B12 or folate deficiency',
  'kidney-disease': 'Anaemia of kidney disease',
  other: 'Other or unexplained — refer to haematology or the family doctor',
}
