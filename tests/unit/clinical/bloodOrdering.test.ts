import { describe, expect, it } from 'vitest'
import { crossmatchToTransfusionRatio, suggestBloodOrder, transfusionIndex, transfusionProbabilityPercent } from '../../../shared/clinical'

// Test vector from the clinical reference §9 (blood ordering audit indices, 2022 audit).
const worked = { unitsCrossmatched: 100, unitsTransfused: 40, patientsCrossmatched: 50, patientsTransfused: 15 }

describe('blood ordering audit indices', () => {
  it(
    'when 100 units are crossmatched for 50 patients and 15 of them receive 40 units, then C:T 2.5, T% 30 and TI 0.8 (clinical ' +
      'reference §9)',
    () => {
      expect(crossmatchToTransfusionRatio(worked)).toBeCloseTo(2.5, 10)
      expect(transfusionProbabilityPercent(worked)).toBeCloseTo(30, 10)
      expect(transfusionIndex(worked)).toBeCloseTo(0.8, 10)
    },
  )

  it('when nothing was transfused or nobody crossmatched, then the indices are missing rather than zero', () => {
    const none = { unitsCrossmatched: 10, unitsTransfused: 0, patientsCrossmatched: 0, patientsTransfused: 0 }
    expect(crossmatchToTransfusionRatio(none)).toBeNull()
    expect(transfusionProbabilityPercent(none)).toBeNull()
    expect(transfusionIndex(none)).toBeNull()
  })

  it('when a crossmatch order has TI 0.2 and T% 10, then the audit suggests group-and-screen', () => {
    const c = {
      unitsCrossmatched: 20,
      unitsTransfused: 2,
      patientsCrossmatched: 10,
      patientsTransfused: 1,
      patients: 10,
      patientsTransfusedAll: 1,
    }
    expect(suggestBloodOrder({ order: 'crossmatch', units: 2 }, c).suggestion).toBe('group-and-screen')
  })

  it('when a crossmatch order has C:T 4 but TI 0.5, then the audit suggests fewer units', () => {
    const c = {
      unitsCrossmatched: 40,
      unitsTransfused: 10,
      patientsCrossmatched: 20,
      patientsTransfused: 8,
      patients: 20,
      patientsTransfusedAll: 8,
    }
    expect(suggestBloodOrder({ order: 'crossmatch', units: 2 }, c).suggestion).toBe('fewer-units')
  })

  it(
    'when the worked example is audited against a crossmatch order, then the order is kept (C:T 2.5 is acceptable, TI 0.8 justifies ' +
      'it)',
    () => {
      expect(suggestBloodOrder({ order: 'crossmatch', units: 2 }, { ...worked, patients: 50, patientsTransfusedAll: 15 }).suggestion).toBe(
        'keep',
      )
    },
  )

  it('when 4 of 10 group-and-screen patients were transfused, then the audit suggests a crossmatch', () => {
    const c = {
      unitsCrossmatched: 0,
      unitsTransfused: 6,
      patientsCrossmatched: 0,
      patientsTransfused: 0,
      patients: 10,
      patientsTransfusedAll: 4,
    }
    expect(suggestBloodOrder({ order: 'group-and-screen', units: 0 }, c).suggestion).toBe('crossmatch')
  })
})
