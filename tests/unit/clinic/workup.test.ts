import { describe, expect, it } from 'vitest'
import { workupPrompts, type WorkupInput } from '../../../shared/clinic/workup'

const base: WorkupInput = {
  sex: 'female',
  ageYears: 40,
  anaemic: true,
  ironStatus: 'iron-restricted',
  b12NgL: 400,
  folateUgL: 8,
  egfr: 90,
  mcvFl: 88,
}
const keys = (i: Partial<WorkupInput>) => workupPrompts({ ...base, ...i }).map((p) => p.key)

describe('anaemia work-up prompts', () => {
  it('when B12 is 150 ng/L, then B12 deficiency is prompted (BSH 2014, Devalia et al.: below 148 pmol/L, 200 ng/L)', () => {
    const p = workupPrompts({ ...base, b12NgL: 150 })
    expect(p.map((x) => x.key)).toContain('b12-deficiency')
    expect(p.find((x) => x.key === 'b12-deficiency')!.source).toMatch(/Devalia et al\., Br J Haematol 2014/)
  })

  it('when folate is 2.5 µg/L, then folate deficiency is prompted (BSH 2014: below 7 nmol/L, 3 µg/L)', () => {
    expect(keys({ folateUgL: 2.5 })).toContain('folate-deficiency')
    expect(keys({ folateUgL: 3 })).not.toContain('folate-deficiency')
  })

  it(
    'when an anaemic patient has eGFR 45, then anaemia of kidney disease and nephrology are prompted (KDIGO 2012); not when eGFR is ' +
      '60',
    () => {
      const p = workupPrompts({ ...base, egfr: 45 }).find((x) => x.key === 'kidney-disease')
      expect(p?.detail).toMatch(/nephrology/)
      expect(p?.source).toMatch(/KDIGO/)
      expect(keys({ egfr: 60 })).not.toContain('kidney-disease')
      expect(keys({ egfr: 45, anaemic: false })).not.toContain('kidney-disease')
    },
  )

  it('when an anaemic patient has MCV 108 fL or normal iron, then other causes and a referral are prompted', () => {
    expect(keys({ mcvFl: 108 })).toContain('other-cause')
    expect(keys({ ironStatus: 'replete' })).toContain('other-cause')
    expect(keys({ ironStatus: 'replete', anaemic: false })).not.toContain('other-cause')
  })

  it(
    'when a man or a woman of 62 has iron-deficiency anaemia, then gastrointestinal investigation is prompted (BSG 2021, Snook et ' +
      'al., Gut 2021)',
    () => {
      const man = workupPrompts({ ...base, sex: 'male', ironStatus: 'absolute-deficiency' }).find((x) => x.key === 'gi-investigation')
      expect(man?.detail).toMatch(/in a man: unless a cause is known, refer for gastrointestinal investigation/)
      expect(man?.source).toMatch(/Snook et al\., Gut 2021/)
      const woman = workupPrompts({ ...base, ageYears: 62, ironStatus: 'absolute-deficiency' }).find((x) => x.key === 'gi-investigation')
      expect(woman?.detail).toMatch(/woman aged 62 \(taken as post-menopausal\)/)
      expect(keys({ ironStatus: 'iron-restricted' })).not.toContain('gi-investigation')
    },
  )
})
