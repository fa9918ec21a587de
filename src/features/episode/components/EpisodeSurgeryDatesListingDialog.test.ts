// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import type { ReferralDetail } from '@shared/pathway/views'
import { answerFetch, mountInApp } from '@/testing/component'
import EpisodeSurgeryDatesListingDialog from './EpisodeSurgeryDatesListingDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// Only what the dialog reads of an episode (invented).
const episode = { id: 7, version: 3, plannedSurgeryDate: '2027-01-20', listingDate: null, surgeryCancelled: null } as ReferralDetail

describe('the listing date', () => {
  it('when a date is entered and saved, then it is sent with the version', async () => {
    const seen = answerFetch({ 'PATCH /referrals/7': { status: 200, body: episode } })
    const wrapper = mountInApp(EpisodeSurgeryDatesListingDialog, { props: { episode, visible: true }, attachTo: document.body })
    await flushPromises()
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('The day the decision to operate was made.')
    const input = document.querySelector<HTMLInputElement>('#listing-date')!
    expect(document.querySelector('label[for="listing-date"]')?.textContent).toBe('Listing date')
    input.value = '2026-11-02'
    input.dispatchEvent(new Event('input'))
    await flushPromises()
    document.querySelector<HTMLButtonElement>('[data-testid="confirm-listing"]')!.click()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).toEqual({ version: 3, listingDate: '2026-11-02' })
    wrapper.unmount()
  })

  it('when "Close without saving" is pressed, then the dialog closes and nothing is sent', async () => {
    const seen = answerFetch({})
    const wrapper = mountInApp(EpisodeSurgeryDatesListingDialog, { props: { episode, visible: true }, attachTo: document.body })
    await flushPromises()
    const close = [...document.querySelectorAll<HTMLButtonElement>('[role="dialog"] button')].find(
      (b) => b.textContent?.trim() === 'Close without saving',
    )!
    close.click()
    await flushPromises()
    expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false])
    expect(seen).toEqual([])
    wrapper.unmount()
  })
})
