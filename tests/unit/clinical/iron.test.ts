import { describe, expect, it } from 'vitest'
import { fcmSimplifiedNeedMg, ganzoniIronDeficit } from '../../../shared/clinical'
import { clinicalError } from './helpers'

// Hb in the sheet is g/dL; here ×10 to g/L with the 0.24 factor.
describe('Ganzoni iron deficit (Ganzoni 1970, Schweiz Med Wochenschr 100:301, citation from memory; formula as in SmPCs)', () => {
  it("when a 70 kg patient has Hb 90 g/L and target 150, then the deficit is 1508 mg (computed from Ganzoni 1970's formula)", () => {
    expect(ganzoniIronDeficit({ weightKg: 70, hbGL: 90, targetHbGL: 150 })).toBe(1508)
  })

  it("when a 70 kg patient has Hb 80 g/L and target 120, then the deficit is 1172 mg (computed from Ganzoni 1970's formula)", () => {
    expect(ganzoniIronDeficit({ weightKg: 70, hbGL: 80, targetHbGL: 120 })).toBe(1172)
  })

  it(
    'when a 30 kg patient has Hb 80 g/L and target 130, then stores are 15 mg/kg and the deficit is 810 mg (computed from Ganzoni ' +
      "1970's formula)",
    () => {
      expect(ganzoniIronDeficit({ weightKg: 30, hbGL: 80, targetHbGL: 130 })).toBe(810)
    },
  )

  it("when a 60 kg patient has Hb 125 g/L and target 130, then the deficit is 572 mg (computed from Ganzoni 1970's formula)", () => {
    expect(ganzoniIronDeficit({ weightKg: 60, hbGL: 125, targetHbGL: 130 })).toBe(572)
  })

  it('when Hb is above the target, then only the stores are replaced, never a negative deficit (common practice)', () => {
    expect(ganzoniIronDeficit({ weightKg: 70, hbGL: 160, targetHbGL: 150 })).toBe(500)
    expect(ganzoniIronDeficit({ weightKg: 20, hbGL: 140, targetHbGL: 130 })).toBe(300)
  })

  it('when the weight is exactly 35 kg, then the adult 500 mg stores apply (SmPC rule "15 mg/kg below 35 kg")', () => {
    expect(ganzoniIronDeficit({ weightKg: 35, hbGL: 130, targetHbGL: 130 })).toBe(500)
    expect(ganzoniIronDeficit({ weightKg: 34.9, hbGL: 130, targetHbGL: 130 })).toBe(524)
  })

  it('when stores are given explicitly, then they replace the default', () => {
    expect(ganzoniIronDeficit({ weightKg: 70, hbGL: 90, targetHbGL: 150, ironStoresMg: 0 })).toBe(1008)
  })

  it('when the result has a fraction, then it is rounded to the nearest mg', () => {
    // 71 × 11 × 0.24 = 187.44 → 687
    expect(ganzoniIronDeficit({ weightKg: 71, hbGL: 119, targetHbGL: 130 })).toBe(687)
  })

  it('when Hb is in g/dL by mistake, then it is refused', () => {
    expect(clinicalError(() => ganzoniIronDeficit({ weightKg: 70, hbGL: 9, targetHbGL: 150 })).input).toBe('hbGL')
  })
})

describe('ferric carboxymaltose simplified table (EU SmPC, label text)', () => {
  it('when a 45 kg patient has Hb 90 g/L, then the cumulative need is 1500 mg (EU SmPC table, clinical reference §6)', () => {
    expect(fcmSimplifiedNeedMg({ weightKg: 45, hbGL: 90 })).toBe(1500)
  })

  it('when the table is read at its edges, then each cell matches the EU SmPC', () => {
    const cases: [number, number, number][] = [
      [30, 90, 500],
      [34.9, 139, 500],
      [35, 99, 1500],
      [69.9, 100, 1000],
      [70, 99.9, 2000],
      [70, 100, 1500],
      [70, 139.9, 1500],
      [70, 140, 500],
      [50, 150, 500],
    ]
    for (const [w, hb, mg] of cases) expect(fcmSimplifiedNeedMg({ weightKg: w, hbGL: hb }), `${w} kg, ${hb} g/L`).toBe(mg)
  })
})
