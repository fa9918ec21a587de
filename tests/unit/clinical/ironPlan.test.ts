import { describe, expect, it } from 'vitest'
import { ironDosePlan, validateIronProduct } from '../../../shared/clinical'
import type { IronProduct } from '../../../shared/clinical'
import { clinicalError } from './helpers'

// Invented formulary entries shaped like the labels in clinical reference §6: ferric
// carboxymaltose EU SmPC (≤1000 mg and ≤20 mg/kg per infusion, ≤1000 mg a week) and iron
// sucrose (≤200 mg per dose, up to three times a week).
const carboxymaltoseLike: IronProduct = {
  code: 'TEST-FCM',
  name: 'Ferric carboxymaltose-like test product',
  route: 'iv',
  maxSingleDoseMg: 1000,
  maxSingleDoseMgPerKg: 20,
  minIntervalDays: 7,
  maxWeeklyMg: 1000,
  roundToMg: 100,
}

const sucroseLike: IronProduct = {
  code: 'TEST-IS',
  name: 'Iron sucrose-like test product',
  route: 'iv',
  maxSingleDoseMg: 200,
  minIntervalDays: 2,
  maxWeeklyMg: 600,
  roundToMg: 100,
}

const oralAlternate: IronProduct = {
  code: 'TEST-ORAL',
  name: 'Oral ferrous salt test product',
  route: 'oral',
  maxSingleDoseMg: 65,
  minIntervalDays: 2,
  oralDailyMg: 65,
  oralAlternateDays: true,
}

describe('IV iron dose plan', () => {
  it(
    'when a 45 kg patient with Hb 90 g/L gets a carboxymaltose-like product, then the first dose is 900 mg (20 mg/kg cap, EU SmPC; ' +
      'sheet test case)',
    () => {
      const plan = ironDosePlan({ product: carboxymaltoseLike, weightKg: 45, hbGL: 90, targetHbGL: 150 })
      // Ganzoni: 45 × 60 × 0.24 + 500 = 1148 mg (computed from Ganzoni 1970's formula), to the nearest 100 mg vial step.
      expect(plan.deficitMg).toBe(1148)
      expect(plan.totalMg).toBe(1100)
      expect(plan.doses.map((d) => [d.doseMg, d.dayOffset])).toEqual([
        [900, 0],
        [200, 7],
      ])
      expect(plan.doses[0].cappedBy).toEqual(['maxSingleDoseMgPerKg'])
      expect(plan.appliedCaps.perDoseLimitMg).toBe(900)
      expect(plan.warnings.some((w) => w.includes('given as 2 doses'))).toBe(true)
    },
  )

  it('when a start date is given, then each dose carries its calendar date', () => {
    const plan = ironDosePlan({ product: carboxymaltoseLike, weightKg: 45, hbGL: 90, targetHbGL: 150, startDate: '2025-03-28' })
    expect(plan.doses.map((d) => d.date)).toEqual(['2025-03-28', '2025-04-04'])
  })

  it(
    'when a 70 kg patient needs 1508 mg of an iron-sucrose-like product, then 200 mg doses run three a week, within 600 mg in any 7 ' +
      'days',
    () => {
      const plan = ironDosePlan({ product: sucroseLike, weightKg: 70, hbGL: 90, targetHbGL: 150 })
      expect(plan.totalMg).toBe(1500)
      expect(plan.doses.map((d) => d.doseMg)).toEqual([200, 200, 200, 200, 200, 200, 200, 100])
      expect(plan.doses.map((d) => d.dayOffset)).toEqual([0, 2, 4, 7, 9, 11, 14, 16])
      expect(plan.doses[3].cappedBy).toContain('maxWeeklyMg')
      for (const dose of plan.doses) {
        const week = plan.doses.filter((d) => d.dayOffset > dose.dayOffset - 7 && d.dayOffset <= dose.dayOffset)
        expect(week.reduce((s, d) => s + d.doseMg, 0)).toBeLessThanOrEqual(600)
      }
      expect(plan.warnings.some((w) => w.includes('8 doses are needed'))).toBe(true)
    },
  )

  it('when the product has a course maximum, then the total is capped and says so', () => {
    const plan = ironDosePlan({ product: { ...carboxymaltoseLike, maxTotalMg: 1000 }, weightKg: 80, hbGL: 90, targetHbGL: 150 })
    expect(plan.deficitMg).toBe(1652)
    expect(plan.totalMg).toBe(1000)
    expect(plan.appliedCaps.totalCappedAtMg).toBe(1000)
    expect(plan.doses).toHaveLength(1)
    expect(plan.warnings.some((w) => w.includes('Total capped at 1000 mg'))).toBe(true)
  })

  it('when Hb is above target, then only the stores are planned and a warning says so', () => {
    const plan = ironDosePlan({ product: carboxymaltoseLike, weightKg: 70, hbGL: 140, targetHbGL: 130 })
    expect(plan.totalMg).toBe(500)
    expect(plan.doses).toHaveLength(1)
    expect(plan.warnings.some((w) => w.includes('iron stores only'))).toBe(true)
  })

  it('when the weight is under 35 kg, or heavy with no height recorded, then a weight warning is given', () => {
    expect(ironDosePlan({ product: carboxymaltoseLike, weightKg: 30, hbGL: 90, targetHbGL: 130 }).warnings.join(' ')).toContain(
      'under 35 kg',
    )
    expect(ironDosePlan({ product: carboxymaltoseLike, weightKg: 150, hbGL: 90, targetHbGL: 130 }).warnings.join(' ')).toContain(
      'obesity cannot be judged',
    )
  })

  it('when the mg/kg cap is below one vial step, then no dose is planned and a warning explains why', () => {
    const plan = ironDosePlan({ product: { ...carboxymaltoseLike, maxSingleDoseMgPerKg: 1 }, weightKg: 50, hbGL: 90, targetHbGL: 130 })
    expect(plan.doses).toEqual([])
    expect(plan.warnings.join(' ')).toContain('below one dose step')
  })

  it('when no dose step is set, then doses are in whole mg', () => {
    const { roundToMg: _omit, ...noStep } = carboxymaltoseLike
    const plan = ironDosePlan({ product: noStep, weightKg: 45, hbGL: 90, targetHbGL: 150 })
    expect(plan.doses.map((d) => d.doseMg)).toEqual([900, 248])
  })
})

describe('oral iron plan', () => {
  it('when the product is oral, then the plan is an alternate-day schedule (Stoffel 2017) with a warning that it needs weeks', () => {
    const plan = ironDosePlan({ product: oralAlternate, weightKg: 70, hbGL: 110, targetHbGL: 130 })
    expect(plan.doses).toEqual([])
    expect(plan.oralSchedule?.alternateDays).toBe(true)
    expect(plan.oralSchedule?.description).toContain('65 mg elemental iron once on alternate days')
    expect(plan.warnings.join(' ')).toContain('Oral iron needs weeks')
  })

  it('when the oral product is daily, then the description says once daily', () => {
    const plan = ironDosePlan({ product: { ...oralAlternate, oralAlternateDays: false }, weightKg: 70, hbGL: 110, targetHbGL: 130 })
    expect(plan.oralSchedule?.description).toContain('once daily')
  })
})

describe('formulary validation', () => {
  it('when a cap is zero, negative or not a number, then the product is refused naming the field', () => {
    expect(clinicalError(() => validateIronProduct({ ...carboxymaltoseLike, maxSingleDoseMg: 0 })).input).toBe('product.maxSingleDoseMg')
    expect(clinicalError(() => validateIronProduct({ ...sucroseLike, minIntervalDays: 1.5 })).input).toBe('product.minIntervalDays')
    expect(clinicalError(() => validateIronProduct({ ...sucroseLike, maxWeeklyMg: Number.NaN })).input).toBe('product.maxWeeklyMg')
    expect(clinicalError(() => validateIronProduct({ ...oralAlternate, oralDailyMg: undefined })).input).toBe('product.oralDailyMg')
    expect(clinicalError(() => validateIronProduct({ ...sucroseLike, code: '' })).input).toBe('product.code')
  })

  it('when the patient values or start date are nonsense, then the plan is refused', () => {
    clinicalError(() => ironDosePlan({ product: sucroseLike, weightKg: 0, hbGL: 90, targetHbGL: 130 }))
    clinicalError(() => ironDosePlan({ product: sucroseLike, weightKg: 70, hbGL: 90, targetHbGL: 130, startDate: 'soon' }))
  })
})
