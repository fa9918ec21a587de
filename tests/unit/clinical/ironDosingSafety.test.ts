import { describe, expect, it } from 'vitest'
import {
  ganzoniIronDeficit,
  idealBodyWeightKg,
  ironDosePlan,
  IronPlanRefusal,
  tableNeedMg,
  validateIronProduct,
} from '../../../shared/clinical'
import type { IronDosingTable, IronProduct } from '../../../shared/clinical'
import { expectWithin } from './helpers'

// Ferinject (ferric carboxymaltose) SmPC section 4.2, Table 1 "Determination of the iron need"
// (MHRA, revision 2021, as reproduced by rxreasoner.com/monographs/ferinject): Hb <10 g/dL:
// 500 / 1,500 / 2,000 mg; 10 to <14 g/dL: 500 / 1,000 / 1,500 mg; ≥14 g/dL: 500 mg, for body
// weight below 35 kg / 35 to <70 kg / 70 kg and above.
const FCM_TABLE: IronDosingTable = {
  weightBandsKg: [0, 35, 70],
  hbBandsGL: [0, 100, 140],
  needMg: [
    [500, 1500, 2000],
    [500, 1000, 1500],
    [500, 500, 500],
  ],
  source: 'Ferinject SmPC 4.2 Table 1',
}

const fcm: IronProduct = {
  code: 'TEST-FCM',
  name: 'Ferric carboxymaltose test product',
  route: 'iv',
  maxSingleDoseMg: 1000,
  maxSingleDoseMgPerKg: 20,
  minIntervalDays: 7,
  maxWeeklyMg: 1000,
  roundToMg: 100,
}
const sucrose: IronProduct = {
  code: 'TEST-IS',
  name: 'Iron sucrose test product',
  route: 'iv',
  maxSingleDoseMg: 200,
  minIntervalDays: 2,
  maxWeeklyMg: 600,
  roundToMg: 100,
}

describe('the product dosing table (ferric carboxymaltose SmPC Table 1)', () => {
  it.each([
    [30, 80, 500],
    [30, 120, 500],
    [60, 95, 1500],
    [60, 100, 1000],
    [60, 139, 1000],
    [60, 140, 500],
    [70, 99, 2000],
    [85, 120, 1500],
    [120, 145, 500],
  ])('when weight is %d kg and Hb %d g/L, then the need is %d mg (Ferinject SmPC 4.2 Table 1)', (weightKg, hbGL, mg) => {
    expect(tableNeedMg(FCM_TABLE, weightKg, hbGL)).toBe(mg)
  })

  it('when the formulary gives the product its table, then the plan uses the table and says so', () => {
    const plan = ironDosePlan({ product: { ...fcm, dosingTable: FCM_TABLE }, weightKg: 60, hbGL: 95, targetHbGL: 150 })
    expect(plan.deficitMg).toBe(1500)
    expect(plan.method.method).toBe('product-table')
    expect(plan.method.methodName).toMatch(/Product dosing table \(Ferinject SmPC 4.2 Table 1\)/)
    expect(plan.doses.map((d) => d.doseMg)).toEqual([1000, 500])
  })

  it(
    "when the table doses a 30 kg patient, then the plan gives the label's 500 mg (Ferinject SmPC 4.2 Table 1: below 35 kg) and no " +
      'warning speaks of Ganzoni stores',
    () => {
      const plan = ironDosePlan({ product: { ...fcm, dosingTable: FCM_TABLE }, weightKg: 30, hbGL: 90, targetHbGL: 150 })
      expect(plan.deficitMg).toBe(500)
      expect(plan.warnings.join(' ')).toMatch(/under 35 kg: adult dose caps may not apply/)
      expect(plan.warnings.join(' ')).not.toMatch(/Ganzoni/)
    },
  )

  it('when a table is malformed, then the formulary entry is refused', () => {
    expect(() => validateIronProduct({ ...fcm, dosingTable: { ...FCM_TABLE, needMg: [[500, 1500]] } })).toThrow(/needMg must have 3 rows/)
    expect(() => validateIronProduct({ ...fcm, dosingTable: { ...FCM_TABLE, weightBandsKg: [35, 70] } })).toThrow(
      /ascending lower band edges starting at 0/,
    )
  })
})

describe('Ganzoni with body size', () => {
  it(
    'when checked against the iron sucrose SmPC example, then 60 kg and an Hb fall of 1 g/dL with no stores needs about 150 mg ' +
      '(Venofer SmPC 4.2: about 150 mg iron to be replaced)',
    () => {
      expectWithin(ganzoniIronDeficit({ weightKg: 60, hbGL: 140, targetHbGL: 150, ironStoresMg: 0 }), 150, 10)
    },
  )

  it(
    'when checked against a published worked example, then a 70 kg woman with Hb 80 g/L needs 1676 mg (askdis.blogspot.com 2015, ' +
      '"Iron dose calculation": 70 × (150 − 80) × 0.24 + 500)',
    () => {
      expect(ganzoniIronDeficit({ weightKg: 70, hbGL: 80, targetHbGL: 150 })).toBe(1676)
    },
  )

  it(
    'when a man is 6 feet (182.88 cm), then Devine ideal body weight is 77.6 kg (Devine 1974: 50 kg + 2.3 kg per inch over 5 feet; ' +
      'common practice)',
    () => {
      expectWithin(idealBodyWeightKg('male', 182.88), 77.6, 0.05)
    },
  )

  it('when BMI is 30 or more, then Ganzoni uses ideal body weight and says so', () => {
    const plan = ironDosePlan({ product: sucrose, weightKg: 150, heightCm: 180, sex: 'male', hbGL: 100, targetHbGL: 150 })
    expect(plan.method.weightBasis).toBe('ideal')
    expect(plan.method.dosingWeightKg).toBeLessThan(80)
    expect(plan.deficitMg).toBeLessThan(ganzoniIronDeficit({ weightKg: 150, hbGL: 100, targetHbGL: 150 }))
    expect(plan.warnings.join(' ')).toMatch(/ideal body weight/)
  })

  it(
    'when a child weighs under 35 kg, then the Ganzoni target is 130 g/L, not 150 (iron sucrose SmPC 4.2: below 35 kg target Hb 13 ' +
      'g/dL)',
    () => {
      const plan = ironDosePlan({ product: { ...sucrose, licensedFromAgeYears: 3 }, weightKg: 30, hbGL: 90, targetHbGL: 150, ageYears: 10 })
      expect(plan.method.targetHbGL).toBe(130)
      expect(plan.deficitMg).toBe(Math.round(30 * 40 * 0.24 + 15 * 30))
    },
  )
})

describe('age', () => {
  it('when an 11-year-old is planned a product not licensed for children, then the plan is refused naming the age', () => {
    let caught: unknown
    try {
      ironDosePlan({ product: fcm, weightKg: 38, hbGL: 95, targetHbGL: 150, ageYears: 11 })
    } catch (e) {
      caught = e
    }
    expect(caught).toBeInstanceOf(IronPlanRefusal)
    expect((caught as IronPlanRefusal).input).toBe('ageYears')
    expect((caught as IronPlanRefusal).message).toMatch(/not marked as licensed at age 11/)
  })

  it(
    'when a 12-year-old of 40 kg gets a product licensed from 1 year, then the paediatric caps limit each dose (15 mg/kg, at most ' +
      '750 mg: Injectafer US label as tabled by ASH Hematology)',
    () => {
      const plan = ironDosePlan({
        product: { ...fcm, licensedFromAgeYears: 1, paediatricMaxSingleDoseMgPerKg: 15, paediatricMaxSingleDoseMg: 750 },
        weightKg: 40,
        hbGL: 95,
        targetHbGL: 150,
        ageYears: 12,
      })
      expect(plan.paediatric).toBe(true)
      expect(plan.appliedCaps.perDoseLimitMg).toBe(600)
      expect(plan.appliedCaps.perDoseLimitedBy).toContain('paediatricMaxSingleDoseMgPerKg')
      expect(plan.doses.every((d) => d.doseMg <= 600)).toBe(true)
    },
  )
})

describe('doses and the surgery date', () => {
  it(
    'when surgery is 5 days away, then a second dose after the operation is left out with a warning and the first carries the ' +
      'too-late caution',
    () => {
      const plan = ironDosePlan({
        product: sucrose,
        weightKg: 70,
        hbGL: 90,
        targetHbGL: 150,
        startDate: '2026-12-04',
        surgeryDate: '2026-12-09',
      })
      expect(plan.doses.every((d) => d.date! < '2026-12-09')).toBe(true)
      expect(plan.timing!.afterSurgery.length).toBeGreaterThan(0)
      expect(plan.warnings.join(' ')).toMatch(/Not planned before surgery: dose 4/)
      expect(plan.timing!.firstDoseTooLate).toBe(true)
      expect(plan.warnings.join(' ')).toMatch(/too late to raise Hb before surgery; consider post-operative iron/)
    },
  )

  it('when surgery is 20 days away, then no too-late caution and no oral-first offer', () => {
    const plan = ironDosePlan({
      product: fcm,
      weightKg: 70,
      hbGL: 100,
      targetHbGL: 150,
      startDate: '2026-12-04',
      surgeryDate: '2026-12-24',
    })
    expect(plan.timing).toMatchObject({ firstDoseTooLate: false, oralFirstOffered: false, afterSurgery: [] })
  })

  it('when surgery is 8 weeks away, then the plan offers oral iron first, citing NICE NG24', () => {
    const plan = ironDosePlan({
      product: fcm,
      weightKg: 70,
      hbGL: 100,
      targetHbGL: 150,
      startDate: '2026-12-04',
      surgeryDate: '2027-01-29',
    })
    expect(plan.timing!.oralFirstOffered).toBe(true)
    expect(plan.warnings.join(' ')).toMatch(/oral iron first is an option.*NICE NG24/)
  })
})
