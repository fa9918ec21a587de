// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import InputNumber from 'primevue/inputnumber'
import Select from 'primevue/select'
import { answerFetch, mountInApp } from '@/testing/component'
import EpisodeResultForm from './EpisodeResultForm.vue'

afterEach(() => vi.unstubAllGlobals())

function mountForm() {
  const wrapper = mountInApp(EpisodeResultForm, { props: { referralId: 7 }, attachTo: document.body })
  const typeValue = async (n: number) => {
    wrapper.findComponent(InputNumber).vm.$emit('update:modelValue', n)
    await flushPromises()
  }
  // The selects in order: test, unit, Hb source.
  const chooseUnit = async (unit: string) => {
    wrapper.findAllComponents(Select)[1]!.vm.$emit('update:modelValue', unit)
    await flushPromises()
  }
  const submit = async () => {
    await wrapper.find('form').trigger('submit')
    await flushPromises()
  }
  return { wrapper, typeValue, chooseUnit, submit }
}

describe('the result form', () => {
  it('when an Hb of 118 g/L is typed, then it is shown in all three units before saving', async () => {
    answerFetch({})
    const { wrapper, typeValue } = mountForm()
    await typeValue(118)
    // 1 g/dL = 10 g/L; 1 g/dL = 0.6206 mmol/L (Hb monomer, 16 114 g/mol): common practice.
    expect(wrapper.get('[data-testid="hb-units"]').text()).toContain('118 g/L = 11.8 g/dL = 7.3 mmol/L')
    expect(wrapper.find('[data-testid="hb-unit-confirm"]').exists()).toBe(false)
    wrapper.unmount()
  })

  it('when 8 is typed in g/dL, then the reader must confirm the unit, and the form is not sent until they do', async () => {
    const seen = answerFetch({ 'POST /referrals/7/results': { status: 201, body: { id: 1 } } })
    const { wrapper, typeValue, chooseUnit, submit } = mountForm()
    await chooseUnit('g/dL')
    await typeValue(8)
    // 8.0 is a plausible Hb in g/dL (80 g/L) and in mmol/L (129 g/L).
    expect(wrapper.get('[data-testid="hb-unit-confirm"]').text()).toContain('The report says g/dL')
    await submit()
    expect(wrapper.text()).toContain('Confirm the unit before saving.')
    expect(seen).toEqual([])
    wrapper.unmount()
  })

  it('when a g/dL figure is typed as g/L, then the shared limits refuse it under the field and nothing is sent', async () => {
    const seen = answerFetch({})
    const { wrapper, typeValue, submit } = mountForm()
    await typeValue(11.8)
    await submit()
    const error = wrapper.get('[data-testid="result-value-error"]').text()
    expect(error).toContain('Haemoglobin in g/L must be between 20 and 250 g/L (got 11.8)')
    expect(error).toContain('it looks like g/dL')
    expect(seen).toEqual([])
    wrapper.unmount()
  })

  it('when the server refuses a field, then its message stands under that field with the field named', async () => {
    const seen = answerFetch({
      'POST /referrals/7/results': {
        status: 422,
        body: {
          error: { code: 'invalid', message: 'The result was not saved', fields: { takenAt: 'must not be before the referral was made' } },
        },
      },
    })
    const { wrapper, typeValue, submit } = mountForm()
    await typeValue(118)
    await submit()
    // Validation, the request and the answer each take a few turns of the event loop.
    await vi.waitFor(() => expect(wrapper.text()).toContain('Time taken must not be before the referral was made'))
    expect(seen).toHaveLength(1)
    expect(seen[0]!.body).toMatchObject({ analyte: 'hb', value: 118, unit: 'g/L' })
    wrapper.unmount()
  })

  it('when the server refuses the whole result, then its message is shown above the form and nothing says saved', async () => {
    answerFetch({
      'POST /referrals/7/results': {
        status: 409,
        body: { error: { code: 'episode_closed', message: 'This episode is closed: results can no longer be added.' } },
      },
    })
    const { wrapper, typeValue, submit } = mountForm()
    await typeValue(118)
    await submit()
    await vi.waitFor(() => expect(wrapper.text()).toContain('This episode is closed: results can no longer be added.'))
    expect(wrapper.text()).not.toContain('Saved:')
    wrapper.unmount()
  })

  it('when the server accepts the result, then the form says what was saved', async () => {
    answerFetch({ 'POST /referrals/7/results': { status: 201, body: { id: 1 } } })
    const { wrapper, typeValue, submit } = mountForm()
    await typeValue(118)
    await submit()
    await vi.waitFor(() => expect(wrapper.text()).toContain('Saved: Haemoglobin 118 g/L.'))
    wrapper.unmount()
  })
})
