import { describe, expect, it } from 'vitest'
import { buildProjection, type ProjectionInputs } from '../../../shared/clinic/projection'
import { BloodVolumeRefusal } from '../../../shared/clinical'
import { DEFAULT_CLINIC_SETTINGS } from '../../../shared/clinic/settings'

const TODAY = '2027-03-01'
const base = {
  today: TODAY,
  timeZone: 'Europe/London',
  antibodiesPositive: null,
  declinesTransfusion: false,
  treatment: null,
  priority: 'routine',
  cardiovascularDisease: false,
  ironStatus: 'replete',
  saO2: 0.97,
  paO2MmHg: 95,
  cardiacOutputLMin: null,
} as const

// Worked patients: every expected figure below was computed by hand from the published formula
// named beside it (Nadler 1962; Gross 1983; Bourke & Smith 1974; Mercuriali & Inghilleri 1996;
// CaO2 = 1.34·Hb·SaO2 + 0.003·PaO2), not taken from the code.
describe('surgery-day projection, worked patients', () => {
  it('when a non-anaemic man (175 cm, 70 kg, Hb 130) has a knee replacement, then he is ready with group and screen', () => {
    const p = buildProjection(
      {
        ...base,
        plannedSurgeryDate: '2027-03-29',
        sex: 'male',
        heightCm: 175,
        weightKg: 70,
        hbMeasurements: [{ takenAt: '2027-02-27', hbGL: 130 }],
        // TKA total loss 1474 mL (Sehat et al., Knee 2000)
        procedure: {
          code: 'TKA',
          name: 'Total knee replacement',
          expectedBloodLossMl: 1474,
          usualBloodOrder: 'group-and-screen',
          usualUnits: 0,
          transfusionRate: null,
        },
      } satisfies ProjectionInputs,
      DEFAULT_CLINIC_SETTINGS,
    )
    expect(p.bloodVolumeMl).toBe(4824) // Nadler: 0.3669·1.75³ + 0.03219·70 + 0.6041 = 4.824 L (reference §3)
    expect(p.triggerHbGL).toBe(70) // NICE NG24 restrictive threshold
    expect(p.predictedSurgeryHbGL).toBe(130) // no treatment: latest value
    expect(p.allowableBloodLossMl.gross).toBe(2894) // 4824·60/100 = 2894.4 (Gross 1983)
    expect(p.allowableBloodLossMl.logarithmic).toBe(2986) // 4824·ln(130/70) = 2986.2 (Bourke & Smith 1974)
    expect(p.predictedPostOpHbGL).toBe(95.8) // 130·e^(−1474/4824) = 95.76
    expect(p.oxygen.today.cao2MlDl).toBe(17.18) // 1.34·13·0.97 + 0.003·95 = 17.182
    // Cardiac output default 3.0 L/min/m² × Mosteller BSA √(175·70/3600) = 1.8447 m² → 5.534 L/min; DO2 = 5.534·17.182·10
    expect(p.inputs.cardiacOutputLMin).toBe(5.53)
    expect(p.oxygen.today.do2MlMin).toBe(951)
    // Mercuriali: tolerated 4824·(0.39 − 0.21) = 868 mL red cells > expected 4824·0.39·(1 − e^(−1474/4824)) = 495 mL → no units
    expect(p.transfusionNeed.toleratedRedCellMl).toBe(868)
    expect(p.transfusionNeed.expectedRedCellLossMl).toBe(495)
    expect(p.bloodOrder).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'group-and-screen' })
    // A recent measured Hb at the threshold, iron replete, no treatment: the evidence is complete.
    expect(p.readiness.verdict).toBe('ready')
    expect(p.readiness.missing).toEqual([])
    expect(p.methods.bloodVolume).toMatch(/Nadler/)
  })

  it(
    'when an iron-deficient woman (160 cm, 60 kg, Hb 100) had 1000 mg IV iron 14 days ago, then the assumed rise is shown but the ' +
      'blood order and allowable loss rest on her measured 100 g/L',
    () => {
      const p = buildProjection(
        {
          ...base,
          plannedSurgeryDate: '2027-03-29', // 28 days away; first dose 14 days ago → 42 days of response
          sex: 'female',
          heightCm: 160,
          weightKg: 60,
          ironStatus: 'absolute-deficiency',
          // Ganzoni deficit 60 × (150 − 100) × 0.24 + 500 = 1220 mg (reference §6)
          treatment: {
            kind: 'iv',
            firstDoseAt: '2027-02-15T00:00:00Z',
            lastDoseAt: '2027-02-15T00:00:00Z',
            totalMg: 1000,
            deficitMg: 1220,
          },
          hbMeasurements: [{ takenAt: '2027-02-10', hbGL: 100 }],
          // THA total loss 1510 mL (Sehat 2004, secondary source)
          procedure: {
            code: 'THA',
            name: 'Total hip replacement',
            expectedBloodLossMl: 1510,
            usualBloodOrder: 'group-and-screen',
            usualUnits: 0,
            transfusionRate: 0.1,
          },
        } satisfies ProjectionInputs,
        DEFAULT_CLINIC_SETTINGS,
      )
      expect(p.bloodVolumeMl).toBe(3627) // Nadler female: 0.3561·1.6³ + 0.03308·60 + 0.1833 = 3.627 L (reference §3)
      // Stated assumption scaled by the dose: 2.5 g/L a week × 1000/1220 for 5 weeks = +10.25 g/L
      expect(p.predictedSurgeryHbGL).toBe(110.2)
      expect(p.planningHbGL).toBe(100)
      expect(p.allowableBloodLossMl.logarithmic).toBe(1294) // 3627·ln(100/70) = 1293.7
      expect(p.allowableBloodLossMl.gross).toBe(1280) // 3627·30/85 = 1280.1
      expect(p.predictedPostOpHbGL).toBe(65.9) // 100·e^(−1510/3627) = 65.95
      // Mercuriali: tolerated 3627·(0.30 − 0.21) = 326 mL; expected 3627·0.30·(1 − e^(−1510/3627)) = 371 mL → 1 unit.
      // With the assumed 110 g/L it would have been group and screen: the assumption must not lower the order.
      expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', units: 1, rule: 'red-cell-volume' })
      // Routine operation, still anaemic on the day and the usual loss beyond tolerance: deferral prompt.
      expect(p.readiness.verdict).toBe('consider-deferral')
      expect(p.readiness.missing.join(' ')).toMatch(/Needs a re-check after iron/)
      expect(p.readiness.reasons.join(' ')).toMatch(/assumed response to iron; it is not evidence/)
      expect(p.assumptions.join(' ')).toMatch(/1000 mg of iron given against a calculated deficit of 1220 mg \(82 %\)/)
    },
  )

  it(
    'when an untreated anaemic man (175 cm, 80 kg, Hb 95, heart disease) has a routine CABG, then deferral is suggested and the 80 ' +
      'g/L trigger is used',
    () => {
      const p = buildProjection(
        {
          ...base,
          plannedSurgeryDate: '2027-04-12',
          sex: 'male',
          heightCm: 175,
          weightKg: 80,
          cardiovascularDisease: true,
          ironStatus: 'absolute-deficiency',
          hbMeasurements: [{ takenAt: '2027-02-20', hbGL: 95 }],
          procedure: {
            code: 'CABG',
            name: 'Coronary artery bypass graft',
            expectedBloodLossMl: 750,
            usualBloodOrder: 'crossmatch',
            usualUnits: 2,
            transfusionRate: null,
          },
        } satisfies ProjectionInputs,
        DEFAULT_CLINIC_SETTINGS,
      )
      expect(p.bloodVolumeMl).toBe(5146) // Nadler: 0.3669·1.75³ + 0.03219·80 + 0.6041 = 5.146 L (reference §3)
      expect(p.triggerHbGL).toBe(80) // AABB 2023 (Carson, JAMA): 8 g/dL with cardiovascular disease
      expect(p.allowableBloodLossMl.logarithmic).toBe(884) // 5146·ln(95/80) = 884.3
      expect(p.allowableBloodLossMl.gross).toBe(882) // 5146·15/87.5 = 882.1
      // Cardiac output 3.0 × Mosteller √(175·80/3600) = 5.916 L/min; CaO2 1.34·9.5·0.97 + 0.285 = 12.633; DO2 = 747.4
      expect(p.oxygen.today.do2MlMin).toBe(747)
      expect(p.readiness.verdict).toBe('consider-deferral')
      expect(p.readiness.reasons.join(' ')).toMatch(/Iron deficiency found at screening/)
      // 0 units by red-cell volume (tolerated 5146·(0.285 − 0.24) = 232 mL > expected 199 mL), but the catalogue orders 2 for CABG.
      expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', units: 2, rule: 'catalogue-order' })
    },
  )

  it('when the same patient is on the cancer pathway, then the verdict is to optimise, not defer', () => {
    const p = buildProjection(
      {
        ...base,
        priority: 'cancer',
        plannedSurgeryDate: '2027-03-15',
        sex: 'male',
        heightCm: 170,
        weightKg: 75,
        hbMeasurements: [{ takenAt: '2027-02-20', hbGL: 92 }],
        procedure: {
          code: 'COLO',
          name: 'Open colorectal resection',
          expectedBloodLossMl: 350,
          usualBloodOrder: 'group-and-screen',
          usualUnits: 0,
          transfusionRate: null,
        },
      } satisfies ProjectionInputs,
      DEFAULT_CLINIC_SETTINGS,
    )
    expect(p.readiness.verdict).toBe('optimise')
    expect(p.readiness.reasons.join(' ')).toMatch(/Not a routine operation/)
  })

  it('then more Hb on the day means more tolerable loss and more oxygen content (monotonic)', () => {
    const make = (hbGL: number) =>
      buildProjection(
        {
          ...base,
          plannedSurgeryDate: '2027-03-20',
          sex: 'female',
          heightCm: 165,
          weightKg: 65,
          hbMeasurements: [{ takenAt: '2027-02-25', hbGL }],
          procedure: {
            code: 'X',
            name: 'X',
            expectedBloodLossMl: 500,
            usualBloodOrder: 'group-and-screen',
            usualUnits: 0,
            transfusionRate: null,
          },
        },
        DEFAULT_CLINIC_SETTINGS,
      )
    const low = make(100)
    const high = make(130)
    expect(high.allowableBloodLossMl.logarithmic).toBeGreaterThan(low.allowableBloodLossMl.logarithmic)
    expect(high.oxygen.surgeryDay.cao2MlDl).toBeGreaterThan(low.oxygen.surgeryDay.cao2MlDl)
    expect(high.cautions[0]).toMatch(/Decision support/)
  })

  const knee = {
    code: 'TKA',
    name: 'Total knee replacement',
    expectedBloodLossMl: 1474,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    transfusionRate: null,
  }

  it(
    'when a 150 kg man of 178 cm (BMI 47) is projected, then blood volume is about 7.16 L by Lemmens 2006, named on the figure, not ' +
      '10.5 L by 70 mL/kg',
    () => {
      const p = buildProjection(
        {
          ...base,
          plannedSurgeryDate: '2027-03-29',
          sex: 'male',
          heightCm: 178,
          weightKg: 150,
          hbMeasurements: [{ takenAt: '2027-02-27', hbGL: 140 }],
          procedure: knee,
        } satisfies ProjectionInputs,
        DEFAULT_CLINIC_SETTINGS,
      )
      // Lemmens, Bernstein & Brodsky, Obes Surg 2006;16:773: 70/√(BMI/22) mL/kg; 150 kg, 178 cm → about 7.16 L
      // (clinical reference §11, computed by hand from the formula, which is quoted from memory there).
      expect(p.bloodVolumeMl).toBeGreaterThan(7100)
      expect(p.bloodVolumeMl).toBeLessThan(7200)
      expect(p.methods.bloodVolume).toMatch(/^Lemmens 2006/)
      expect(p.methods.allowableBloodLoss).toMatch(/Lemmens 2006/)
      expect(p.cautions.join(' ')).toMatch(/lean mass/)
      // 7158·ln(140/70) = 4961 mL; by 70 mL/kg of actual weight it would have been 10500·ln 2 = 7278 mL.
      expect(p.allowableBloodLossMl.logarithmic).toBeGreaterThan(4900)
      expect(p.allowableBloodLossMl.logarithmic).toBeLessThan(5000)
    },
  )

  it('when no height is recorded, then the projection is refused naming height instead of using actual weight', () => {
    expect(() =>
      buildProjection(
        {
          ...base,
          plannedSurgeryDate: '2027-03-29',
          sex: 'male',
          heightCm: null,
          weightKg: 150,
          hbMeasurements: [{ takenAt: '2027-02-27', hbGL: 140 }],
          procedure: knee,
        } satisfies ProjectionInputs,
        DEFAULT_CLINIC_SETTINGS,
      ),
    ).toThrow(BloodVolumeRefusal)
  })
})
