import { describe, expect, it } from 'vitest'
import { analyteForCode, checkCsvRecord, codeWork, DEFAULT_MAPPING, type ColumnMapping } from '../../shared/imports'

/**
 * Issue 15: a saved mapping with 5,000 test codes made a 1,000-row preview normalise the whole
 * code list again for every row (rows × codes = 5,000,000 normalisations). The lookup is now
 * built once per mapping, so the work is rows + codes.
 */
describe('matching test codes against a large mapping', () => {
  const codes: ColumnMapping['codes'] = Object.fromEntries(Array.from({ length: 5000 }, (_, i) => [`LAB-${i}`, i % 2 ? 'hb' : 'ferritin']))
  const mapping: ColumnMapping = { ...DEFAULT_MAPPING, codes }

  it('when 1,000 rows are checked against a 5,000-code mapping, then the codes are normalised once, not once per row', () => {
    const before = codeWork.squashed
    for (let i = 0; i < 1000; i++) {
      const record = { mrn: `M${i}`, test_code: `lab ${i % 5000}`, value: '120', unit: 'g/L', taken_at: '2026-01-05T09:00:00Z' }
      checkCsvRecord(record, mapping, 'Europe/London', Date.parse('2026-02-01T00:00:00Z'))
    }
    const work = codeWork.squashed - before
    // 5,000 codes once plus one per row (a little slack); the old loop needed 5,000,000.
    expect(work).toBeLessThanOrEqual(5000 + 1000 + 10)
  })

  it("then the source's own codes still win, ignoring case, spaces, dashes and underscores", () => {
    expect(analyteForCode('lab_3', codes)).toBe('hb')
    expect(analyteForCode('LAB 4', codes)).toBe('ferritin')
    expect(analyteForCode('HGB', codes)).toBe('hb')
    expect(analyteForCode('718-7', {})).toBe('hb') // LOINC 718-7, Hemoglobin [Mass/volume] in Blood (loinc.org)
    expect(analyteForCode('nothing-like-it', codes)).toBeUndefined()
  })
})
