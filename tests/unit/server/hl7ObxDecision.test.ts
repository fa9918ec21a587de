import { describe, expect, it } from 'vitest'
import { decideObx, movesScreening, type SampleRow } from '../../../server/services/hl7/obxDecision'
import type { ObxReading } from '../../../server/services/hl7/oruRead'

const at = new Date('2026-03-02T08:30:00Z')

/** An Hb OBX (invented values) as readOru gives it. */
function obx(action: ObxReading['action'], valueGL: number, extra: Partial<ObxReading> = {}): ObxReading {
  return {
    seq: 1,
    action,
    comparator: null,
    range: '',
    flags: '',
    reading: { mrn: 'X1', analyte: 'hb', unit: 'g/L', value: valueGL, valueCanonical: valueGL, takenAt: at },
    ...extra,
  }
}
const row = (id: number, valueCanonical: number, status: SampleRow['status'] = 'final', voided = false): SampleRow => ({
  id,
  status,
  comparator: null,
  valueCanonical,
  voidedAt: voided ? at : null,
})

describe('what one OBX does to its sample (the rule both HL7 paths apply)', () => {
  it('when the sample has no row yet, then a final value is added and nothing is voided', () => {
    expect(decideObx(obx('final', 98), [], 'C1')).toMatchObject({ voidIds: [], write: { kind: 'insert', change: 'result-added' } })
  })

  it('when the same final value is stored already, then nothing new is written (the natural key)', () => {
    expect(decideObx(obx('final', 98), [row(7, 98)], 'C1')).toMatchObject({ voidIds: [], write: { kind: 'nothing' } })
  })

  it('when a final value follows a preliminary one of another value, then the preliminary is voided and the final added', () => {
    const d = decideObx(obx('final', 101), [row(7, 97, 'preliminary')], 'C2')
    expect(d).toEqual({
      voidIds: [7],
      voidReason: 'replaced by the final value (message C2)',
      write: { kind: 'insert', change: 'result-added' },
    })
  })

  it('when a final value equals the preliminary one, then that row is promoted, not added again', () => {
    expect(decideObx(obx('final', 97), [row(7, 97, 'preliminary')], 'C2')).toMatchObject({
      voidIds: [],
      write: { kind: 'update', resultId: 7, change: 'result-promoted' },
    })
  })

  it('when a correction arrives, then every live value of the sample is voided and the corrected one stored', () => {
    const d = decideObx(obx('corrected', 104), [row(7, 98), row(8, 99, 'final', true), row(9, 100)], 'C3')
    expect(d).toEqual({
      voidIds: [7, 9],
      voidReason: 'corrected by the laboratory (message C3)',
      write: { kind: 'insert', change: 'result-corrected' },
    })
  })

  it('when a correction brings back a voided value, then that row is revived as corrected', () => {
    const d = decideObx(obx('corrected', 99), [row(7, 98), row(8, 99, 'final', true)], 'C3')
    expect(d).toMatchObject({ voidIds: [7], write: { kind: 'update', resultId: 8, change: 'result-corrected' } })
  })

  it('when the laboratory deletes a result (X), then every live row of the sample is voided and nothing is written', () => {
    const d = decideObx(obx('void', 0), [row(7, 98), row(8, 99, 'final', true)], 'C4')
    expect(d).toEqual({ voidIds: [7], voidReason: 'deleted by the laboratory (message C4)', write: { kind: 'nothing' } })
  })

  it('when a preliminary arrives for a sample that has a final value, then it changes nothing', () => {
    expect(decideObx(obx('preliminary', 90), [row(7, 98)], 'C5')).toMatchObject({ voidIds: [], write: { kind: 'nothing' } })
  })

  it('when a final value is the stored one with another comparator, then the row is re-labelled, not added', () => {
    const stored = { ...row(7, 5), comparator: '<' }
    expect(decideObx(obx('final', 5), [stored], 'C6')).toMatchObject({ write: { kind: 'update', resultId: 7, change: 'result-promoted' } })
  })

  it('when a converted value lies within its tolerance of a stored one, then it is the same value', () => {
    const o = obx('final', 98)
    const converted = { ...o, reading: { ...o.reading, valueCanonical: 98.04, tolerance: 0.05 } }
    expect(decideObx(converted, [row(7, 98)], 'C7').write.kind).toBe('nothing')
  })
})

describe('whether an OBX moves the screening', () => {
  it('when a final Hb is added, then the screening moves; a preliminary, a value beyond a limit or no change do not', () => {
    expect(movesScreening(obx('final', 98), ['result-added'])).toBe(true)
    expect(movesScreening(obx('preliminary', 98), ['result-added'])).toBe(false)
    expect(movesScreening(obx('final', 5, { comparator: '<' }), ['result-added'])).toBe(false)
    expect(movesScreening(obx('final', 98), [])).toBe(false)
  })

  it('when a value is voided or corrected, then the screening moves whatever the test', () => {
    expect(movesScreening(obx('preliminary', 98), ['result-voided'])).toBe(true)
  })
})
