import { describe, expect, it } from 'vitest'
import { decideBloodOrder } from '../../../shared/clinic/bloodOrder'

const proc = (usualBloodOrder: string, usualUnits: number, transfusionRate: number | null) => ({
  name: 'Test operation',
  usualBloodOrder,
  usualUnits,
  transfusionRate,
})
const base = { antibodiesPositive: null, declinesTransfusion: false }

describe('which rule decides the blood order', () => {
  it(
    'when the operation is rarely transfused and the patient needs no units, then group and screen (Boral & Henry, Transfusion ' + '1977)',
    () => {
      expect(decideBloodOrder({ ...base, calculatedUnits: 0, procedure: proc('group-and-screen', 0, 0.05) })).toMatchObject({
        kind: 'group-and-screen',
        units: 0,
        rule: 'group-and-screen',
      })
    },
  )

  it('when the patient needs 3 units and the catalogue orders 2, then the patient’s own estimate decides 3', () => {
    expect(decideBloodOrder({ ...base, calculatedUnits: 3, procedure: proc('crossmatch', 2, 0.4) })).toMatchObject({
      kind: 'crossmatch',
      units: 3,
      rule: 'red-cell-volume',
    })
  })

  it('when the patient needs 1 unit and the catalogue orders 2, then the catalogue decides 2 (the larger order wins)', () => {
    expect(decideBloodOrder({ ...base, calculatedUnits: 1, procedure: proc('crossmatch', 2, 0.4) })).toMatchObject({
      kind: 'crossmatch',
      units: 2,
      rule: 'catalogue-order',
    })
  })

  it('when a refusal of transfusion is recorded, then it overrides every order, even a positive antibody screen', () => {
    const d = decideBloodOrder({
      calculatedUnits: 4,
      procedure: proc('crossmatch', 2, 0.4),
      antibodiesPositive: true,
      declinesTransfusion: true,
    })
    expect(d).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'declines-transfusion' })
    expect(d.notes.join(' ')).toMatch(/Red-cell antibodies are also recorded/)
  })

  it('then every order lists each rule it considered, in words', () => {
    const d = decideBloodOrder({ ...base, calculatedUnits: 0, procedure: proc('group-and-screen', 0, null) })
    expect(d.considered).toEqual([
      'Red-cell-volume estimate: no units needed.',
      'Catalogue order for Test operation: group and screen.',
      'Catalogue transfusion rate: not recorded.',
    ])
  })
})
