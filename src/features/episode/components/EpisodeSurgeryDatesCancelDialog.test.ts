// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import Select from 'primevue/select'
import type { ReferralDetail } from '@shared/pathway/views'
import { answerFetch, mountInApp } from '@/testing/component'
import EpisodeSurgeryDatesCancelDialog from './EpisodeSurgeryDatesCancelDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// Only what the dialog reads of an episode (invented).
const episode = { id: 7, version: 3, plannedSurgeryDate: '2027-01-20', surgeryCancelled: null } as ReferralDetail

describe('cancelling the planned operation', () => {
  it('when a reason and a note are given, then the cancellation is sent and the dialog closes', async () => {
    const seen = answerFetch({ 'POST /referrals/7/cancellation': { status: 200, body: episode } })
    const wrapper = mountInApp(EpisodeSurgeryDatesCancelDialog, { props: { episode, visible: true }, attachTo: document.body })
    await flushPromises()
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Cancel the planned operation')
    expect(document.querySelector('[data-testid="cancel-op-form"]')?.textContent).toContain('Tell theatre scheduling as usual')
    const buttons = [...document.querySelectorAll('[role="dialog"] button')].map((b) => b.textContent?.trim())
    expect(buttons).toEqual(expect.arrayContaining(['Keep the operation', 'Cancel the operation']))
    wrapper.findComponent(Select).vm.$emit('update:modelValue', 'patient-choice')
    const note = document.querySelector<HTMLTextAreaElement>('#cancel-op-note')!
    note.value = 'Wishes to wait until after the holidays'
    note.dispatchEvent(new Event('input'))
    await flushPromises()
    document.querySelector<HTMLButtonElement>('[data-testid="confirm-cancel-op"]')!.click()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).toEqual({ version: 3, reason: 'patient-choice', note: 'Wishes to wait until after the holidays' })
    await vi.waitFor(() => expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false]))
    wrapper.unmount()
  })
})
