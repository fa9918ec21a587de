import { describe, expect, it } from 'vitest'
import {
  convertHb,
  creatinineMgDlToUmolL,
  creatinineUmolLToMgDl,
  ironUgDlToUmolL,
  ironUmolLToUgDl,
  kPaToMmHg,
  mmHgToKPa,
  tibcFromTransferrin,
  tsatFromIron,
} from '../../../shared/clinical'
import { clinicalError, expectWithin } from './helpers'

describe('haemoglobin unit conversion', () => {
  it('when Hb is 13 g/dL, then it is 8.068 mmol/L (per-monomer factor 0.6206, clinical reference §7)', () => {
    expectWithin(convertHb(13, 'g/dL', 'mmol/L'), 8.068, 0.001)
  })

  it('when Hb is 8.0 mmol/L, then it is 12.89 g/dL (factor 0.6206, clinical reference §7)', () => {
    expectWithin(convertHb(8.0, 'mmol/L', 'g/dL'), 12.89, 0.01)
  })

  it('when Hb is 125 g/L, then it is 12.5 g/dL and 7.7575 mmol/L (×0.6206, computed by hand)', () => {
    expectWithin(convertHb(125, 'g/L', 'g/dL'), 12.5, 1e-12)
    expectWithin(convertHb(125, 'g/L', 'mmol/L'), 7.7575, 1e-9)
  })

  it('when a value goes through every unit and back, then it comes back unchanged', () => {
    for (const gL of [20, 68, 99.5, 130, 250]) {
      const viaMmol = convertHb(convertHb(gL, 'g/L', 'mmol/L'), 'mmol/L', 'g/dL')
      expectWithin(convertHb(viaMmol, 'g/dL', 'g/L'), gL, 1e-9)
    }
  })

  it('when a g/dL value is sent as g/L, then it is refused with the g/L range', () => {
    const error = clinicalError(() => convertHb(12.5, 'g/L', 'g/dL'))
    expect(error.message).toBe('hb must be between 20 and 250 g/L (got 12.5)')
  })

  it('when the unit is unknown, then it is refused', () => {
    clinicalError(() => convertHb(120, 'g/L', 'mg/dL' as never))
  })
})

describe('pressure, creatinine and iron conversions', () => {
  it('when PO2 is 100 mmHg, then it is 13.33 kPa; 10 kPa is 75.006 mmHg (×7.50062, common practice)', () => {
    expectWithin(mmHgToKPa(100), 13.33, 0.01)
    expectWithin(kPaToMmHg(10), 75.006, 0.01)
  })

  it('when pressures make a round trip, then they are unchanged', () => {
    for (const mmHg of [0, 40, 75.00616, 700]) expectWithin(kPaToMmHg(mmHgToKPa(mmHg)), mmHg, 1e-9)
  })

  it('when creatinine is 88.4 µmol/L, then it is 1.0 mg/dL (÷88.4, from memory, clinical reference §7)', () => {
    expectWithin(creatinineUmolLToMgDl(88.4), 1, 1e-12)
    expectWithin(creatinineMgDlToUmolL(1.2), 106.08, 1e-9)
    expectWithin(creatinineMgDlToUmolL(creatinineUmolLToMgDl(150)), 150, 1e-9)
  })

  it('when serum iron is 56 µg/dL, then it is 10.03 µmol/L (×0.1791, computed, clinical reference §7)', () => {
    expectWithin(ironUgDlToUmolL(56), 10.03, 0.01)
    expectWithin(ironUmolLToUgDl(ironUgDlToUmolL(56)), 56, 1e-9)
  })

  it('when transferrin is 2.4 g/L, then TIBC is 60.24 µmol/L (×25.1, from memory, clinical reference §7)', () => {
    expectWithin(tibcFromTransferrin(2.4), 60.24, 0.01)
  })

  it('when iron is 10 and TIBC 60 µmol/L, then TSAT is 16.7 % (iron/TIBC × 100, clinical reference §7)', () => {
    expectWithin(tsatFromIron({ ironUmolL: 10, tibcUmolL: 60 }), 16.7, 0.1)
  })

  it('when serum iron exceeds TIBC, then TSAT is refused as an entry error', () => {
    const error = clinicalError(() => tsatFromIron({ ironUmolL: 70, tibcUmolL: 60 }))
    expect(error.input).toBe('ironUmolL')
  })

  it('when creatinine is implausible, then the conversion is refused naming µmol/L', () => {
    expect(clinicalError(() => creatinineUmolLToMgDl(5)).message).toBe('creatinineUmolL must be between 10 and 3000 µmol/L (got 5)')
  })
})
