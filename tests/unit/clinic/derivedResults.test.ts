import { describe, expect, it } from 'vitest'
import { ClinicalInputError } from '../../../shared/clinical'
import { egfrFromCreatinine, tsatFromSample } from '../../../shared/clinic/derivations'
import { screeningOutcome } from '../../../shared/clinic/screening'

/**
 * The rules the server applies to every stored result (typed in, CSV, FHIR, HL7), checked
 * against the clinical reference's vectors with the source named beside each value. Creatinine
 * in µmol/L = mg/dL × 88.4 (clinical reference §7).
 */
const at = new Date('2027-03-01T09:00:00Z')
const umol = (mgDl: number) => mgDl * 88.4

describe('derived TSAT (TSAT % = serum iron / TIBC × 100; clinical reference §7, verified)', () => {
  it('when a sample has iron 10 µmol/L and transferrin 2.4 g/L, then TIBC is 60.24 µmol/L (×25.1, reference §7) and TSAT 16.6 %', () => {
    const tsat = tsatFromSample([
      { id: 1, analyte: 'iron', valueCanonical: 10 },
      { id: 2, analyte: 'transferrin', valueCanonical: 2.4 },
    ])
    expect(tsat?.value).toBeCloseTo(16.6, 1)
    expect(tsat?.derivedFrom).toEqual([1, 2])
  })

  it('when a sample has both TIBC and transferrin, then the measured TIBC is used (iron 10 / TIBC 60 gives 16.7 %, reference §7)', () => {
    const tsat = tsatFromSample([
      { id: 1, analyte: 'iron', valueCanonical: 10 },
      { id: 2, analyte: 'transferrin', valueCanonical: 2.0 },
      { id: 3, analyte: 'tibc', valueCanonical: 60 },
    ])
    expect(tsat).toEqual({ value: 16.7, derivedFrom: [1, 3] })
  })

  it('when iron was entered twice for one sample, then the newest entry counts (iron 12 / TIBC 60 = 20 %, reference §7 definition)', () => {
    const tsat = tsatFromSample([
      { id: 1, analyte: 'iron', valueCanonical: 10 },
      { id: 2, analyte: 'tibc', valueCanonical: 60 },
      { id: 3, analyte: 'iron', valueCanonical: 12 },
    ])
    expect(tsat).toEqual({ value: 20, derivedFrom: [3, 2] })
  })

  it(
    'when iron exceeds the binding capacity, then no TSAT is derived and the entry is refused as an ' +
      'error (a saturation above 100 % is impossible)',
    () => {
      expect(() =>
        tsatFromSample([
          { id: 1, analyte: 'iron', valueCanonical: 70 },
          { id: 2, analyte: 'tibc', valueCanonical: 60 },
        ]),
      ).toThrow(ClinicalInputError)
    },
  )

  it('when a sample has iron but no transferrin or TIBC, then nothing is derived', () => {
    expect(tsatFromSample([{ id: 1, analyte: 'iron', valueCanonical: 10 }])).toBeNull()
  })
})

describe('derived eGFR (CKD-EPI 2021, Inker et al., N Engl J Med 2021;385:1737; vectors from clinical reference §10)', () => {
  it('when a 60-year-old man has creatinine 1.2 mg/dL, then eGFR is 69.2 mL/min/1.73 m² (reference §10, computed from Inker 2021)', () => {
    expect(egfrFromCreatinine(umol(1.2), '2027-03-01', { dateOfBirth: '1967-01-10', sex: 'male' })).toBeCloseTo(69.2, 1)
  })

  it('when a 50-year-old man has creatinine 0.7 mg/dL, then eGFR is 112.3 (reference §10, computed from Inker 2021)', () => {
    expect(egfrFromCreatinine(umol(0.7), '2027-03-01', { dateOfBirth: '1977-02-01', sex: 'male' })).toBeCloseTo(112.3, 1)
  })

  it('when a 70-year-old woman has creatinine 2.0 mg/dL, then eGFR is 26.4, stage G4 (reference §10, computed from Inker 2021)', () => {
    expect(egfrFromCreatinine(umol(2.0), '2027-03-01', { dateOfBirth: '1956-12-01', sex: 'female' })).toBeCloseTo(26.4, 1)
  })

  it('when the patient is 17 on the day of the sample, then no eGFR is derived (the equation is for adults; Inker 2021)', () => {
    expect(egfrFromCreatinine(umol(0.9), '2027-03-01', { dateOfBirth: '2009-03-02', sex: 'female' })).toBeNull()
  })
})

describe('screening outcome thresholds (clinical reference §5)', () => {
  it(
    'when a man has Hb 129 g/L under the surgical criteria, then he is anaemic; at 130 g/L he is not ' +
      '(Muñoz, Anaesthesia 2017;72:233: Hb < 130 g/L)',
    () => {
      expect(screeningOutcome({ hb: { value: 129, takenAt: at }, ferritin: 150, tsat: 25 }, 'male', 'surgical').anaemic).toBe(true)
      expect(screeningOutcome({ hb: { value: 130, takenAt: at }, ferritin: 150, tsat: 25 }, 'male', 'surgical').anaemic).toBe(false)
    },
  )

  it(
    'when a woman has Hb 125 g/L, then she is not anaemic by WHO 2024 (< 120 g/L) but is by the surgical ' +
      'criteria (< 130 g/L, Muñoz 2017)',
    () => {
      expect(screeningOutcome({ hb: { value: 125, takenAt: at } }, 'female', 'who').anaemic).toBe(false)
      expect(screeningOutcome({ hb: { value: 125, takenAt: at } }, 'female', 'surgical')).toMatchObject({
        anaemic: true,
        anaemiaSeverity: 'mild',
      })
    },
  )

  it(
    'when a man has Hb 125 g/L under WHO criteria, then he is mildly anaemic (WHO 2024: < 130 g/L in ' +
      'men; WHO 2011 bands, from memory)',
    () => {
      expect(screeningOutcome({ hb: { value: 125, takenAt: at } }, 'male', 'who')).toMatchObject({
        anaemic: true,
        anaemiaSeverity: 'mild',
        proposedStage: 'clinic',
      })
    },
  )

  it(
    'when ferritin is 25 µg/L, then iron is absolutely deficient and the patient goes to clinic (Muñoz ' +
      '2017 ferritin < 30, from memory)',
    () => {
      expect(screeningOutcome({ hb: { value: 140, takenAt: at }, ferritin: 25 }, 'male', 'surgical')).toMatchObject({
        ironStatus: 'absolute-deficiency',
        proposedStage: 'clinic',
      })
    },
  )

  it(
    'when ferritin is 150 µg/L with TSAT 15 %, then iron is restricted (sequestration) and the patient ' +
      'goes to clinic (Muñoz 2017, from memory)',
    () => {
      expect(screeningOutcome({ hb: { value: 140, takenAt: at }, ferritin: 150, tsat: 15 }, 'male', 'surgical')).toMatchObject({
        ironStatus: 'iron-restricted',
        proposedStage: 'clinic',
      })
    },
  )

  it(
    'when Hb is 138 g/L with ferritin 150 µg/L and TSAT 25 %, then the patient is proposed for clearance ' +
      '(neither anaemic nor iron deficient)',
    () => {
      expect(screeningOutcome({ hb: { value: 138, takenAt: at }, ferritin: 150, tsat: 25 }, 'female', 'surgical')).toMatchObject({
        anaemic: false,
        ironStatus: 'replete',
        proposedStage: 'cleared',
      })
    },
  )

  it('when there is no Hb, or a non-anaemic patient has no ferritin, then the screen is incomplete and nothing is proposed', () => {
    expect(screeningOutcome({ ferritin: 150, tsat: 25 }, 'female', 'surgical')).toMatchObject({
      anaemic: null,
      proposedStage: null,
      latestHbGL: null,
    })
    expect(screeningOutcome({ hb: { value: 138, takenAt: at } }, 'female', 'surgical')).toMatchObject({
      anaemic: false,
      ironStatus: null,
      proposedStage: null,
    })
  })
})
