import { describe, expect, it } from 'vitest'
import { checkGivenDose } from '../../../shared/clinic/doseCheck'
import type { IronProduct } from '../../../shared/clinical'

// Caps shaped like the Ferinject SmPC 4.2 (≤1000 mg and ≤20 mg/kg a dose, ≤1000 mg a week,
// 7 days apart) and the Injectafer US label for children (15 mg/kg, ≤750 mg).
const fcm: IronProduct = {
  code: 'T-FCM',
  name: 'Ferric carboxymaltose test product',
  route: 'iv',
  maxSingleDoseMg: 1000,
  maxSingleDoseMgPerKg: 20,
  minIntervalDays: 7,
  maxWeeklyMg: 1000,
  roundToMg: 100,
  licensedFromAgeYears: 1,
  paediatricMaxSingleDoseMgPerKg: 15,
  paediatricMaxSingleDoseMg: 750,
}
const day = (n: number) => new Date(Date.UTC(2026, 11, 1 + n, 10))
const base = {
  product: fcm,
  weightKg: 70,
  paediatric: false,
  doseMg: 500,
  givenAt: day(10),
  earlier: [],
  givenOnPrescriptionMg: 0,
  prescribedTotalMg: 1500,
}
const caps = (over: Partial<Omit<typeof base, 'earlier'>> & { earlier?: { doseMg: number; givenAt: Date }[] }) =>
  checkGivenDose({ ...base, ...over }).map((v) => v.cap)

describe('re-checking a dose as it is recorded', () => {
  it('when the dose keeps every cap, then nothing is flagged', () => {
    expect(caps({})).toEqual([])
  })

  it('when the dose would pass the prescribed total, then the prescribed total is named', () => {
    const v = checkGivenDose({ ...base, doseMg: 1000, givenOnPrescriptionMg: 1000 })
    expect(v.map((x) => x.cap)).toEqual(['prescribedTotal'])
    expect(v[0]!.message).toMatch(/2000 mg, over the prescribed total of 1500 mg/)
  })

  it('when a second dose comes 3 days after the first, then the interval is named', () => {
    expect(caps({ earlier: [{ doseMg: 500, givenAt: day(7) }] })).toEqual(['minIntervalDays'])
  })

  it('when two doses make more than 1000 mg in 7 days, then the weekly maximum is named', () => {
    expect(caps({ doseMg: 600, earlier: [{ doseMg: 500, givenAt: day(7) }], product: { ...fcm, minIntervalDays: 2 } })).toEqual([
      'maxWeeklyMg',
    ])
  })

  it('when a child of 30 kg is given 500 mg, then the paediatric 15 mg/kg cap is named', () => {
    expect(caps({ weightKg: 30, paediatric: true })).toContain('paediatricMaxSingleDoseMgPerKg')
    expect(caps({ weightKg: 30, paediatric: false })).toEqual([])
  })

  it('when a single dose is over 1000 mg or 20 mg/kg, then each cap is named', () => {
    expect(checkGivenDose({ ...base, doseMg: 1200, prescribedTotalMg: 2000 }).map((v) => `${v.cap}: ${v.message}`)).toEqual([
      'maxSingleDoseMg: This dose (1200 mg) is over the largest single dose of 1000 mg for Ferric carboxymaltose test product',
      'maxWeeklyMg: 1200 mg within 7 days is over the weekly maximum of 1000 mg for Ferric carboxymaltose test product',
    ])
    expect(caps({ weightKg: 40, doseMg: 900 })).toEqual(['maxSingleDoseMgPerKg'])
  })

  it('when the course would pass the product maximum, then the course maximum is named', () => {
    const v = checkGivenDose({
      ...base,
      product: { ...fcm, maxTotalMg: 2000 },
      doseMg: 1000,
      givenOnPrescriptionMg: 1500,
      prescribedTotalMg: 3000,
    })
    expect(v.map((x) => x.cap)).toEqual(['maxTotalMg'])
    expect(v[0]!.message).toMatch(/2500 mg, over the product's maximum of 2000 mg/)
  })

  it('when a dose is recorded after the fact 3 days before a dose already on file, then the interval to that later dose is named', () => {
    const v = checkGivenDose({ ...base, givenAt: day(10), earlier: [{ doseMg: 500, givenAt: day(13) }] })
    expect(v.map((x) => x.cap)).toEqual(['minIntervalDays'])
    expect(v[0]!.message).toMatch(/nearest dose after this one is 3 days away/)
  })

  it(
    'when a dose recorded after the fact makes more than 1000 mg with a later dose in the same 7 days, then the weekly maximum is ' +
      'named',
    () => {
      const twoDay = { ...fcm, minIntervalDays: 2 }
      expect(caps({ product: twoDay, doseMg: 600, givenAt: day(10), earlier: [{ doseMg: 500, givenAt: day(14) }] })).toEqual([
        'maxWeeklyMg',
      ])
      expect(caps({ product: twoDay, doseMg: 600, givenAt: day(10), earlier: [{ doseMg: 500, givenAt: day(17) }] })).toEqual([])
    },
  )
})
