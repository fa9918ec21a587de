import { describe, expect, it } from 'vitest'
import { checkCsvFields, checkCsvRecord, DEFAULT_MAPPING, mappedColumnIndexes, type ColumnMapping } from '../../shared/imports'

// An import checks each CSV row from its array of fields by the mapped columns' positions; the rule is
// checkCsvRecord's on the object csv-parse used to build (the header's names, a repeated name keeps its last field).
function asRecord(header: string[], fields: string[]): Record<string, string> {
  const record: Record<string, string> = {}
  for (let i = 0; i < fields.length && i < header.length; i++) record[header[i]!] = fields[i]!
  return record
}

const NOW = Date.parse('2026-06-01T12:00:00Z')
const ROWS = [
  ['BN0000001', 'HB', '118', 'g/L', '2026-05-01T09:30:00Z'],
  ['BN0000001', 'HB', '11.8', 'g/dL', '2026-05-01 09:30'],
  ['BN0000002', 'FERR', '45,5', 'ug/L', '01/05/2026 09:30'],
  ['BN0000003', 'CREA', '<5', 'umol/L', '2026-05-01T09:30:00+01:00'],
  ['', 'HB', '118', 'g/L', '2026-05-01T09:30:00Z'],
  ['BN0000004', 'XYZ', '118', 'g/L', '2026-05-01T09:30:00Z'],
  ['BN0000005', 'HB', '118', 'g/L', '2026-02-30 09:30'],
  ['BN0000006', 'HB', '900', 'g/L', '2026-05-01T09:30:00Z'],
  [' BN0000007 ', ' mcv ', ' 88.5 ', ' fL ', ' 2026-05-01T09:30:00Z '],
]

describe('a CSV row checked from its fields', () => {
  for (const mapping of [DEFAULT_MAPPING, { ...DEFAULT_MAPPING, dateOrder: 'dmy' } satisfies ColumnMapping])
    it(`when rows are valid, unreadable or refused (${mapping.dateOrder} dates), then each gets the answer checkCsvRecord gives`, () => {
      const header = ['mrn', 'test_code', 'value', 'unit', 'taken_at']
      const at = mappedColumnIndexes(header, mapping)
      for (const fields of ROWS)
        expect(checkCsvFields(fields, at, mapping, 'Europe/London', NOW), fields.join(',')).toEqual(
          checkCsvRecord(asRecord(header, fields), mapping, 'Europe/London', NOW),
        )
    })

  it('when the header names a column twice, then the last of them is read, as before', () => {
    const header = ['value', 'mrn', 'test_code', 'value', 'unit', 'taken_at']
    const fields = ['999', 'BN0000001', 'HB', '118', 'g/L', '2026-05-01T09:30:00Z']
    const checked = checkCsvFields(fields, mappedColumnIndexes(header, DEFAULT_MAPPING), DEFAULT_MAPPING, 'Europe/London', NOW)
    expect(checked).toEqual(checkCsvRecord(asRecord(header, fields), DEFAULT_MAPPING, 'Europe/London', NOW))
    expect(checked.ok && checked.reading.value).toBe(118)
  })
})
