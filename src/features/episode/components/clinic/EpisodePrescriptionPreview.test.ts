// @vitest-environment jsdom
import { describe, expect, it } from 'vitest'
import { ironDosePlan } from '@shared/clinical/ironPlan'
import type { IronProduct } from '@shared/clinical/ironProduct'
import type { DosePlanPreview } from '@shared/clinic/views'
import { mountInApp } from '@/testing/component'
import EpisodePrescriptionPreview from './EpisodePrescriptionPreview.vue'

// An invented formulary entry (demo data): 1000 mg or 20 mg/kg a dose, 7 days apart, 100 mg vials.
const product: IronProduct = {
  code: 'demo-iv-a',
  name: 'Demo IV iron A',
  route: 'iv',
  maxSingleDoseMg: 1000,
  maxSingleDoseMgPerKg: 20,
  minIntervalDays: 7,
  roundToMg: 100,
  phosphateCheckOnRepeat: true,
}
const inputs = {
  weightKg: 45,
  weightMeasuredAt: '2026-03-02',
  heightCm: null,
  ageYears: 61,
  hbGL: 80,
  hbTakenAt: '2026-03-01',
  targetHbGL: 150,
  firstDoseDate: '2026-03-09',
  plannedSurgeryDate: '2026-06-15',
}
const weightWarning = 'The weight (45 kg) was measured 120 days ago, more than 90: re-weigh the patient before relying on this dose.'
const phosphateMessage = 'A repeat course of Demo IV iron A: check serum phosphate before the first dose.'

/** The server's answer: the plan from the shared rules, and what the server adds around it. */
function preview(extra: { weightOld?: boolean; phosphate?: boolean } = {}): DosePlanPreview {
  const plan = ironDosePlan({
    product,
    weightKg: inputs.weightKg,
    hbGL: inputs.hbGL,
    targetHbGL: inputs.targetHbGL,
    startDate: inputs.firstDoseDate,
    ageYears: inputs.ageYears,
  })
  const warnings = [...(extra.weightOld ? [weightWarning] : []), ...plan.warnings, ...(extra.phosphate ? [phosphateMessage] : [])]
  return {
    product,
    productSource: 'Local formulary (demo).',
    inputs,
    plan: { ...plan, warnings },
    phosphate: { needed: !!extra.phosphate, message: extra.phosphate ? phosphateMessage : '' },
    methods: { deficit: 'Ganzoni, actual weight', caps: 'Caps from the formulary.' },
    cautions: [],
    cautionQuestions: [],
  }
}

describe('the prescription preview', () => {
  it('when 45 kg limits each dose, then the caps are listed in words with the figures they came from', () => {
    const wrapper = mountInApp(EpisodePrescriptionPreview, { props: { preview: preview(), updating: false } })
    const caps = wrapper.get('.prescription-preview__caps').text()
    // 20 mg/kg × 45 kg = 900 mg, below the 1000 mg single-dose limit.
    expect(caps).toContain('Per dose at most 900 mg (mg per kg limit)')
    expect(caps).toContain('At most 20 mg/kg (weight 45 kg)')
    expect(caps).toContain('At least 7 days between doses')
    expect(caps).toContain('Doses in steps of 100 mg')
    expect(wrapper.get('[data-testid="dose-total"]').text()).toBe(`${preview().plan.totalMg} mg`)
  })

  it('when the plan splits the total, then the warning names the cap in words, never by its identifier', () => {
    const p = preview()
    expect(p.plan.doses.length).toBeGreaterThan(1)
    const wrapper = mountInApp(EpisodePrescriptionPreview, { props: { preview: p, updating: false } })
    const warnings = wrapper.get('[data-testid="dose-warnings"]').text()
    expect(warnings).toContain('Check:')
    expect(warnings).toContain('exceeds the per-dose limit of 900 mg (mg per kg limit)')
    expect(warnings).not.toContain('maxSingleDoseMgPerKg')
  })

  it('when the weight is out of date, then it stands apart as an alert and is not repeated among the warnings', () => {
    const wrapper = mountInApp(EpisodePrescriptionPreview, { props: { preview: preview({ weightOld: true }), updating: false } })
    const alert = wrapper.get('[data-testid="weight-warning"]')
    expect(alert.attributes('role')).toBe('alert')
    expect(alert.text()).toContain('Weight out of date.')
    expect(alert.text()).toContain('re-weigh the patient')
    expect(wrapper.get('[data-testid="dose-warnings"]').text()).not.toContain('re-weigh')
  })

  it('when a phosphate is needed first, then it is said once, above the figures', () => {
    const wrapper = mountInApp(EpisodePrescriptionPreview, { props: { preview: preview({ phosphate: true }), updating: false } })
    expect(wrapper.get('[data-testid="phosphate-needed"]').text()).toContain('Phosphate first.')
    expect(wrapper.get('[data-testid="dose-warnings"]').text()).not.toContain('serum phosphate')
  })

  it('when the answer carries no warning, then no warning list and no alert are shown', () => {
    const base = preview()
    const wrapper = mountInApp(EpisodePrescriptionPreview, {
      props: { preview: { ...base, plan: { ...base.plan, warnings: [] } }, updating: false },
    })
    expect(wrapper.find('[data-testid="dose-warnings"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="weight-warning"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="phosphate-needed"]').exists()).toBe(false)
  })
})
