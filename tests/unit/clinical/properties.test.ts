import { describe, expect, it } from 'vitest'
import {
  allowableBloodLoss,
  bmi,
  bsaDuBois,
  bsaMosteller,
  classifyAnaemia,
  classifyIronStatus,
  ClinicalInputError,
  convertHb,
  egfrCkdEpi2021,
  estimatedBloodVolume,
  ganzoniIronDeficit,
  ironDosePlan,
  oxygenContent,
  oxygenDelivery,
  oxygenExtraction,
  po2FromSaturation,
  projectHb,
  redCellTransfusionNeed,
  saturationFromPo2,
} from '../../../shared/clinical'
import type { IronProduct, Sex } from '../../../shared/clinical'
import { mulberry32, pick, uniform } from './helpers'

const RUNS = 3000
const SEED = 20250301
const SEXES: readonly Sex[] = ['female', 'male']

const finiteIn = (x: number, min: number, max: number) => Number.isFinite(x) && x >= min && x <= max

describe(`property-style checks (mulberry32 seed ${SEED}, ${RUNS} runs each)`, () => {
  it('when inputs are random but valid, then every output is finite and physically possible', () => {
    const r = mulberry32(SEED)
    for (let i = 0; i < RUNS; i += 1) {
      const sex = pick(r, SEXES)
      const heightCm = uniform(r, 40, 250)
      const weightKg = uniform(r, 2, 350)
      const hb = uniform(r, 20, 250)
      const floor = uniform(r, 20, 250)
      const po2 = uniform(r, 0, 700)
      const p50MmHg = uniform(r, 10, 60)
      const ctx = `run ${i}`

      const s = saturationFromPo2(po2, { p50MmHg })
      const sh = saturationFromPo2(po2, { model: 'hill', p50MmHg, hillN: uniform(r, 1, 5) })
      expect(finiteIn(s, 0, 1) && finiteIn(sh, 0, 1), ctx).toBe(true)

      const ca = oxygenContent({ hbGL: hb, so2: r(), po2MmHg: po2, hufnerMlPerG: uniform(r, 1, 1.4) })
      expect(finiteIn(ca, 0, 40), ctx).toBe(true)
      const cv = ca * r()
      expect(finiteIn(oxygenDelivery({ cardiacOutputLMin: uniform(r, 1, 20), cao2MlDl: ca }), 0, 8000), ctx).toBe(true)
      if (ca > 0) expect(finiteIn(oxygenExtraction({ cao2MlDl: ca, cvo2MlDl: cv }), 0, 1), ctx).toBe(true)

      const ebv = estimatedBloodVolume({ sex, heightCm, weightKg, method: pick(r, ['nadler', 'weight'] as const) })
      expect(finiteIn(ebv, 100, 30000), ctx).toBe(true)
      const gross = allowableBloodLoss({ ebvMl: ebv, hbStartGL: hb, hbFloorGL: floor })
      const log = allowableBloodLoss({ ebvMl: ebv, hbStartGL: hb, hbFloorGL: floor, method: 'logarithmic' })
      expect(finiteIn(gross, 0, 2 * ebv) && finiteIn(log, 0, 3 * ebv) && log >= gross - 1e-9, ctx).toBe(true)

      const need = redCellTransfusionNeed({ ebvMl: ebv, hbStartGL: hb, hbFloorGL: floor, expectedLossMl: uniform(r, 0, 30000) })
      expect(Number.isInteger(need.units) && need.units >= 0 && need.toleratedRedCellMl >= 0, ctx).toBe(true)

      const deficit = ganzoniIronDeficit({ weightKg, hbGL: hb, targetHbGL: uniform(r, 20, 250) })
      expect(finiteIn(deficit, 30, 350 * 230 * 0.24 + 500) && Number.isInteger(deficit), ctx).toBe(true)

      const who = classifyAnaemia({ hbGL: hb, sex, criteria: 'who' })
      expect(who.anaemic, ctx).toBe(hb < (sex === 'male' ? 130 : 120))
      expect(who.severity === 'none', ctx).toBe(!who.anaemic)
      const a = classifyAnaemia({ hbGL: hb, sex, criteria: 'surgical' })
      expect(a.anaemic, ctx).toBe(hb < 130)
      expect(['absolute-deficiency', 'iron-restricted', 'replete', 'indeterminate']).toContain(
        classifyIronStatus({
          ferritinUgL: uniform(r, 0, 2000),
          tsatPct: r() < 0.8 ? uniform(r, 0, 100) : undefined,
          crpMgL: r() < 0.8 ? uniform(r, 0, 300) : undefined,
        }),
      )

      const egfr = egfrCkdEpi2021({ creatinineUmolL: uniform(r, 10, 3000), ageYears: uniform(r, 18, 120), sex })
      expect(finiteIn(egfr, 0, 250), ctx).toBe(true)
      expect(
        finiteIn(bmi({ heightCm, weightKg }), 0.3, 2200) &&
          finiteIn(bsaMosteller({ heightCm, weightKg }), 0.04, 5) &&
          finiteIn(bsaDuBois({ heightCm, weightKg }), 0.04, 5),
        ctx,
      ).toBe(true)

      const gL = convertHb(convertHb(hb, 'g/L', 'mmol/L'), 'mmol/L', 'g/L')
      expect(Math.abs(gL - hb) < 1e-9, ctx).toBe(true)
    }
  })

  it('when saturations are random, then PO2 → SO2 → PO2 round trips hold for both models and shifted P50s', () => {
    const r = mulberry32(SEED + 1)
    for (let i = 0; i < RUNS; i += 1) {
      const options = { model: pick(r, ['severinghaus', 'hill'] as const), p50MmHg: uniform(r, 15, 40), hillN: uniform(r, 1.5, 3.5) }
      const po2 = uniform(r, 0.1, 300)
      const back = po2FromSaturation(saturationFromPo2(po2, options), options)
      expect(Math.abs(back - po2), `run ${i}: ${JSON.stringify(options)} po2 ${po2}`).toBeLessThan(1e-6)
    }
  })

  it('when IV products and patients are random, then each plan sums to its total and respects every cap', () => {
    const r = mulberry32(SEED + 2)
    for (let i = 0; i < 500; i += 1) {
      const product: IronProduct = {
        code: `P${i}`,
        name: 'random test product',
        route: 'iv',
        maxSingleDoseMg: pick(r, [100, 200, 500, 1000, 1500]),
        maxSingleDoseMgPerKg: r() < 0.5 ? pick(r, [7, 15, 20]) : undefined,
        minIntervalDays: pick(r, [1, 2, 7]),
        maxWeeklyMg: r() < 0.6 ? pick(r, [500, 600, 1000]) : undefined,
        maxTotalMg: r() < 0.3 ? pick(r, [1000, 2000]) : undefined,
        roundToMg: pick(r, [1, 50, 100]),
      }
      const weightKg = uniform(r, 35, 200)
      const plan = ironDosePlan({ product, weightKg, hbGL: uniform(r, 60, 160), targetHbGL: pick(r, [120, 130, 150]) })
      const ctx = `run ${i}: ${JSON.stringify(product)} ${weightKg}`
      if (plan.doses.length === 0) continue
      expect(
        plan.doses.reduce((s, d) => s + d.doseMg, 0),
        ctx,
      ).toBe(plan.totalMg)
      if (product.maxTotalMg !== undefined) expect(plan.totalMg, ctx).toBeLessThanOrEqual(product.maxTotalMg)
      plan.doses.forEach((d, k) => {
        expect(d.doseMg, ctx).toBeLessThanOrEqual(plan.appliedCaps.perDoseLimitMg)
        expect(d.doseMg % (product.roundToMg ?? 1), ctx).toBe(0)
        if (k > 0) expect(d.dayOffset - plan.doses[k - 1].dayOffset, ctx).toBeGreaterThanOrEqual(product.minIntervalDays)
        const week = plan.doses.filter((e) => e.dayOffset > d.dayOffset - 7 && e.dayOffset <= d.dayOffset)
        if (product.maxWeeklyMg !== undefined)
          expect(
            week.reduce((s, e) => s + e.doseMg, 0),
            ctx,
          ).toBeLessThanOrEqual(product.maxWeeklyMg)
      })
    }
  })

  it('when Hb histories are random, then the projection stays within the plausible Hb range', () => {
    const r = mulberry32(SEED + 3)
    const day = (n: number) => new Date(Date.UTC(2025, 0, 1) + n * 86_400_000)
    for (let i = 0; i < 1000; i += 1) {
      const count = 1 + Math.floor(r() * 5)
      const measurements = Array.from({ length: count }, () => ({ takenAt: day(Math.floor(r() * 60)), hbGL: uniform(r, 20, 250) }))
      const treatment = r() < 0.7 ? { kind: pick(r, ['iv', 'oral'] as const), firstDoseDate: day(Math.floor(r() * 60)) } : undefined
      const p = projectHb({ targetDate: day(60 + Math.floor(r() * 120)), measurements, treatment })
      expect(finiteIn(p.hbGL, 20, 250) && p.assumptions.length > 0, `run ${i}`).toBe(true)
    }
  })

  it('when inputs are random nonsense, then every function throws ClinicalInputError', () => {
    const r = mulberry32(SEED + 4)
    const bad = (min: number, max: number): number =>
      pick(r, [
        Number.NaN,
        Number.POSITIVE_INFINITY,
        Number.NEGATIVE_INFINITY,
        min - 1 - r() * 1000,
        max + 0.5 + r() * 1000,
        -r() * 100 - 1e-3,
      ])
    const calls: ((r: () => number) => unknown)[] = [
      () => saturationFromPo2(bad(0, 700)),
      () => po2FromSaturation(pick(r, [bad(0, 1), uniform(r, 1.01, 100)])),
      () => oxygenContent({ hbGL: bad(20, 250), so2: 0.98, po2MmHg: 100 }),
      () => oxygenContent({ hbGL: 140, so2: uniform(r, 1.01, 100), po2MmHg: 100 }),
      () => oxygenContent({ hbGL: 140, so2: 0.98, po2MmHg: bad(0, 700) }),
      () => oxygenDelivery({ cardiacOutputLMin: bad(1, 20), cao2MlDl: 20 }),
      () => estimatedBloodVolume({ sex: 'male', heightCm: bad(40, 250), weightKg: 70 }),
      () => estimatedBloodVolume({ sex: 'female', weightKg: bad(2, 350), method: 'weight' }),
      () => allowableBloodLoss({ ebvMl: 5000, hbStartGL: bad(20, 250), hbFloorGL: 80 }),
      () => redCellTransfusionNeed({ ebvMl: 5000, hbStartGL: 130, hbFloorGL: 80, expectedLossMl: bad(0, 30000) }),
      () => ganzoniIronDeficit({ weightKg: bad(2, 350), hbGL: 100, targetHbGL: 130 }),
      () => classifyAnaemia({ hbGL: bad(20, 250), sex: 'female', criteria: 'who' }),
      () => classifyIronStatus({ ferritinUgL: bad(0, 100000) }),
      () => classifyIronStatus({ ferritinUgL: 50, tsatPct: bad(0, 100) }),
      () => egfrCkdEpi2021({ creatinineUmolL: bad(10, 3000), ageYears: 50, sex: 'male' }),
      () => egfrCkdEpi2021({ creatinineUmolL: 80, ageYears: pick(r, [bad(18, 120), uniform(r, 0, 17.99)]), sex: 'male' }),
      () => bsaMosteller({ heightCm: 170, weightKg: bad(2, 350) }),
      () => convertHb(bad(2, 25), 'g/dL', 'g/L'),
      () => projectHb({ targetDate: '2025-06-01', measurements: [{ takenAt: '2025-03-01', hbGL: bad(20, 250) }] }),
    ]
    for (let i = 0; i < RUNS; i += 1) {
      const k = Math.floor(r() * calls.length)
      let thrown: unknown
      try {
        calls[k](r)
      } catch (error) {
        thrown = error
      }
      expect(thrown, `run ${i}, call ${k}`).toBeInstanceOf(ClinicalInputError)
    }
  })
})
