import { describe, expect, it } from 'vitest'
import { latestFromRows, screeningOutcome } from '../../../shared/clinic/screening'
import { egfrFromCreatinine, tsatFromSample } from '../../../shared/clinic/derivations'
import { dateInZone } from '../../../shared/pathway'

const at = (iso: string) => new Date(iso)

describe('screening outcome (one copy for results, imports and the seed)', () => {
  it('when a man has Hb 125 g/L under the surgical criteria, then he is anaemic and goes to clinic', () => {
    // < 130 g/L in both sexes before major surgery (Muñoz et al., Anaesthesia 2017;72:233; reference §5)
    const o = screeningOutcome({ hb: { value: 125, takenAt: at('2027-02-01T09:00:00Z') }, ferritin: 150, tsat: 25 }, 'male', 'surgical')
    expect(o).toMatchObject({ anaemic: true, proposedStage: 'clinic', ironStatus: 'replete' })
  })

  it('when ferritin is 50 µg/L with no TSAT or CRP, then iron status is indeterminate and the patient goes to clinic, not cleared', () => {
    // Ferritin 30–100 needs TSAT < 20 % or CRP > 5 mg/L to decide (Muñoz 2017, from memory; reference §5)
    const o = screeningOutcome({ hb: { value: 138, takenAt: at('2027-02-01T09:00:00Z') }, ferritin: 50 }, 'female', 'surgical')
    expect(o).toMatchObject({ anaemic: false, ironStatus: 'indeterminate', proposedStage: 'clinic' })
  })

  it('when ferritin is 60 µg/L with TSAT 15 %, then iron deficiency is found (reference §5 check value, from memory)', () => {
    const o = screeningOutcome({ hb: { value: 138, takenAt: at('2027-02-01T09:00:00Z') }, ferritin: 60, tsat: 15 }, 'female', 'surgical')
    expect(o.proposedStage).toBe('clinic')
    expect(o.ironStatus).not.toBe('replete')
  })

  it('when rows arrive newest first, then the newest value of each analyte is used', () => {
    const v = latestFromRows([
      { analyte: 'hb', valueCanonical: 131, takenAt: at('2027-02-10T09:00:00Z') },
      { analyte: 'hb', valueCanonical: 118, takenAt: at('2027-01-10T09:00:00Z') },
      { analyte: 'ferritin', valueCanonical: 40, takenAt: at('2027-01-10T09:00:00Z') },
    ])
    expect(v).toEqual({ hb: { value: 131, takenAt: at('2027-02-10T09:00:00Z') }, ferritin: 40 })
  })
})

describe('derived results', () => {
  it('when iron is 10 µmol/L and TIBC 60 µmol/L in one sample, then TSAT is 16.7 % (TSAT = iron / TIBC × 100; reference §7)', () => {
    expect(
      tsatFromSample([
        { id: 1, analyte: 'iron', valueCanonical: 10 },
        { id: 2, analyte: 'tibc', valueCanonical: 60 },
      ]),
    ).toEqual({ value: 16.7, derivedFrom: [1, 2] })
  })

  it('when the laboratory reported a TSAT for the sample, then none is derived', () => {
    expect(
      tsatFromSample([
        { id: 1, analyte: 'iron', valueCanonical: 10 },
        { id: 2, analyte: 'tibc', valueCanonical: 60 },
        { id: 3, analyte: 'tsat', valueCanonical: 17 },
      ]),
    ).toBeNull()
  })

  it(
    'when a 55-year-old woman has creatinine 0.9 mg/dL (79.6 µmol/L), then eGFR is about 76 (CKD-EPI 2021, Inker NEJM 2021; a ' +
      'secondary page gives ≈ 76)',
    () => {
      expect(egfrFromCreatinine(0.9 * 88.4, '2027-06-01', { dateOfBirth: '1972-01-15', sex: 'female' })).toBeCloseTo(75.5, 0)
    },
  )

  it('when a creatinine is taken at 00:30 London time on an 18th birthday, then the clinic day counts and eGFR is reported', () => {
    // 23:30 UTC on 14 July is 00:30 BST on 15 July, the birthday.
    const takenOn = dateInZone('2027-07-14T23:30:00Z', 'Europe/London')
    expect(takenOn).toBe('2027-07-15')
    expect(egfrFromCreatinine(70, takenOn, { dateOfBirth: '2009-07-15', sex: 'male' })).not.toBeNull()
    // Read in UTC the sample would be the day before the birthday: a 17-year-old, no eGFR.
    expect(egfrFromCreatinine(70, '2027-07-14', { dateOfBirth: '2009-07-15', sex: 'male' })).toBeNull()
  })
})
