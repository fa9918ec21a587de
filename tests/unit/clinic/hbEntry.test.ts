import { describe, expect, it } from 'vitest'
import { hbDefaultUnit, hbInAllUnits, hbUnitAmbiguity } from '../../../shared/pathway/hbEntry'
import { createResultSchema } from '../../../shared/schemas/results'

const takenAt = new Date(Date.now() - 3_600_000)
const errorsOf = async (body: object) => {
  try {
    await createResultSchema.validate({ takenAt, ...body }, { abortEarly: false })
    return []
  } catch (e) {
    return (e as { inner: { path: string; message: string }[] }).inner.map((i) => `${i.path}: ${i.message}`)
  }
}

describe('Hb entry units', () => {
  it(
    'when Hb is 8.0 mmol/L, then it shows as 128.9 g/L and 12.9 g/dL (×16.11 ' + 'g/L per mmol/L, per Fe monomer; clinical reference §7)',
    () => {
      expect(hbInAllUnits(8, 'mmol/L')).toEqual({ gL: 128.9, gDl: 12.9, mmolL: 8 })
    },
  )

  it('when the source is a point-of-care meter or an outside mmol/L laboratory, then its default unit is g/dL or mmol/L', () => {
    expect(hbDefaultUnit('hospital-lab')).toBe('g/L')
    expect(hbDefaultUnit('point-of-care')).toBe('g/dL')
    expect(hbDefaultUnit('outside-lab-mmol')).toBe('mmol/L')
  })

  it('when Hb 8.5 is entered in mmol/L or g/dL without confirmation, then it is refused naming both readings and both ranges', async () => {
    expect(hbUnitAmbiguity(8.5, 'mmol/L')).toMatch(
      /fits both g\/dL \(2–25\) and mmol\/L \(1\.2–15\.5\): it is 85 g\/L as g\/dL but 137 g\/L as mmol\/L/,
    )
    expect(await errorsOf({ analyte: 'hb', value: 8.5, unit: 'g/dL' })).toEqual([
      expect.stringMatching(/^unitConfirmed: Hb 8\.5 fits both/),
    ])
    expect(await errorsOf({ analyte: 'hb', value: 8.5, unit: 'g/dL', unitConfirmed: true })).toEqual([])
  })

  it('when Hb 17 g/dL is entered, then no confirmation is needed (above the mmol/L range)', async () => {
    expect(hbUnitAmbiguity(17, 'g/dL')).toBeNull()
    expect(await errorsOf({ analyte: 'hb', value: 17, unit: 'g/dL' })).toEqual([])
  })
})

describe('other inputs refuse nonsense', () => {
  it('when TSAT is typed as a fraction (0.15), then it is refused with the 1–100 % range and a hint', async () => {
    expect(await errorsOf({ analyte: 'tsat', value: 0.15, unit: '%' })).toEqual([
      'value: Transferrin saturation in % must be between 1 and 100 % (got 0.15); it looks like a fraction: enter it as a ' +
        'percentage (15 %)',
    ])
  })

  it('when TSAT is 101 %, then it is refused naming the limit', async () => {
    expect((await errorsOf({ analyte: 'tsat', value: 101, unit: '%' }))[0]).toMatch(/between 1 and 100 %/)
  })

  it('when CRP is in mg/dL, then the unit is accepted and its limit is named in mg/dL', async () => {
    expect(await errorsOf({ analyte: 'crp', value: 2.5, unit: 'mg/dL' })).toEqual([])
    expect((await errorsOf({ analyte: 'crp', value: 150, unit: 'mg/dL' }))[0]).toMatch(/CRP in mg\/dL must be between 0 and 100 mg\/dL/)
  })
})
