// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import Select from 'primevue/select'
import type { ReferralDetail } from '@shared/pathway/views'
import { answerFetch, mountInApp } from '@/testing/component'
import EpisodeSurgeryDatesMoveDialog from './EpisodeSurgeryDatesMoveDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// Only what the dialog reads of an episode (invented).
const episode = (over: Partial<ReferralDetail> = {}) =>
  ({ id: 7, version: 3, plannedSurgeryDate: '2027-01-20', surgeryCancelled: null, ...over }) as ReferralDetail

async function mountDialog(ep: ReferralDetail) {
  const wrapper = mountInApp(EpisodeSurgeryDatesMoveDialog, { props: { episode: ep, visible: true }, attachTo: document.body })
  await flushPromises()
  const submit = async () => {
    document.querySelector<HTMLButtonElement>('[data-testid="confirm-move-date"]')!.click()
    await flushPromises()
  }
  return { wrapper, submit }
}

describe('moving the surgery date', () => {
  it('when no reason is chosen, then the dialog asks for one and sends nothing', async () => {
    const seen = answerFetch({})
    const { wrapper, submit } = await mountDialog(episode())
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Move the surgery date')
    expect(document.querySelector('[data-testid="move-date-form"]')?.textContent).toContain('The change is kept with who, when and why.')
    await submit()
    await vi.waitFor(() => expect(document.body.textContent).toContain('Choose why the surgery date is changing'))
    expect(seen).toEqual([])
    wrapper.unmount()
  })

  it('when a reason is chosen, then the move is sent with the version, and a refusal shows above the fields', async () => {
    const seen = answerFetch({
      'PATCH /referrals/7': { status: 409, body: { error: { code: 'stale_version', message: 'Someone changed this episode' } } },
    })
    const { wrapper, submit } = await mountDialog(episode())
    wrapper.findComponent(Select).vm.$emit('update:modelValue', 'anaemia')
    await flushPromises()
    await submit()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).toEqual({ version: 3, plannedSurgeryDate: '2027-01-20', dateChangeReason: 'anaemia', dateChangeNote: null })
    await vi.waitFor(() => expect(document.querySelector('.form-dialog__msg')?.textContent).toContain('Someone changed this episode'))
    wrapper.unmount()
  })

  it('when the operation was cancelled, then the same frame offers to rebook it', async () => {
    answerFetch({})
    const cancelled = { fromDate: '2027-01-20', changedAt: '2026-12-01T10:00:00Z', changedBy: null } as ReferralDetail['surgeryCancelled']
    const { wrapper } = await mountDialog(episode({ surgeryCancelled: cancelled }))
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Rebook the operation')
    expect(document.querySelector('[data-testid="confirm-move-date"]')?.textContent).toContain('Rebook')
    wrapper.unmount()
  })
})
