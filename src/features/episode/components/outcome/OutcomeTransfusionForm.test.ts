// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { answerFetch, mountInApp } from '@/testing/component'
import OutcomeTransfusionForm from './OutcomeTransfusionForm.vue'
import OutcomeHbInput from './OutcomeHbInput.vue'

afterEach(() => vi.unstubAllGlobals())

// The threshold and its basis as the server sends them for an orthopaedic patient (AABB 2023).
const threshold = { thresholdGL: 80, basis: 'Orthopaedic surgery: 80 g/L (AABB 2023)' }

function mountForm() {
  const wrapper = mountInApp(OutcomeTransfusionForm, { props: { referralId: 7, threshold }, attachTo: document.body })
  // The Hb inputs in order: before the unit, after it.
  const typeHb = async (which: 0 | 1, gL: number) => {
    wrapper.findAllComponents(OutcomeHbInput)[which]!.vm.$emit('update:modelValue', gL)
    await flushPromises()
  }
  const submit = async () => {
    await wrapper.find('form').trigger('submit')
    await flushPromises()
  }
  return { wrapper, typeHb, submit }
}

describe('recording a transfusion', () => {
  it('when a pre-transfusion Hb above the threshold is typed, then the form says so and asks for the reason', async () => {
    answerFetch({})
    const { wrapper, typeHb } = mountForm()
    expect(wrapper.get('[data-testid="tx-threshold"]').text()).toBe('Threshold 80 g/L: Orthopaedic surgery: 80 g/L (AABB 2023)')
    await typeHb(0, 72)
    expect(wrapper.get('[data-testid="tx-against-threshold"]').text()).toContain("72 g/L is below this patient's threshold of 80 g/L.")
    await typeHb(0, 85)
    expect(wrapper.get('[data-testid="tx-against-threshold"]').text()).toContain('Give the reason for transfusing above it.')
    wrapper.unmount()
  })

  it('when a unit is saved, then it is sent with its codes, and the form is ready for the next unit', async () => {
    const seen = answerFetch({ 'POST /referrals/7/transfusions': { status: 201, body: { transfusion: { id: 1 } } } })
    const { wrapper, typeHb, submit } = mountForm()
    await typeHb(0, 72)
    await typeHb(1, 81)
    await wrapper.get('#tx-codes').setValue('E0336V00 E0337V00')
    await submit()
    await vi.waitFor(() => expect(wrapper.find('[data-testid="tx-saved"]').exists()).toBe(true))
    expect(seen).toHaveLength(1)
    expect(seen[0]!.body).toMatchObject({
      phase: 'after-surgery',
      component: 'red-cells',
      units: 1,
      preTransfusionHbGL: 72,
      postTransfusionHbGL: 81,
      productCodes: ['E0336V00', 'E0337V00'],
      reason: null,
    })
    expect(wrapper.get('[data-testid="tx-saved"]').text()).toBe('1 saved in this entry; the next unit is ready.')
    expect((wrapper.get('#tx-codes').element as HTMLInputElement).value).toBe('')
    expect(wrapper.find('[data-testid="tx-against-threshold"]').exists()).toBe(false)
    wrapper.unmount()
  })
})
