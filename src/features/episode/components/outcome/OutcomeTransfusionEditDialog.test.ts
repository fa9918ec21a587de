// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import type { TransfusionView } from '@shared/transfusion/views'
import { answerFetch, mountInApp } from '@/testing/component'
import OutcomeTransfusionEditDialog from './OutcomeTransfusionEditDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// Invented row; the threshold and its basis are what the server sends for an orthopaedic patient (AABB 2023).
const row: TransfusionView = {
  id: 31,
  referralId: 7,
  givenAt: '2026-11-30T09:15:00.000Z',
  phase: 'after-surgery',
  component: 'red-cells',
  units: 1,
  preTransfusionHbGL: 72,
  postTransfusionHbGL: 81,
  reassessedBeforeNext: true,
  informationGiven: true,
  productCodes: ['E0336V00', 'E0337V00'],
  reason: null,
  thresholdGL: 80,
  thresholdBasis: 'Orthopaedic surgery: 80 g/L (AABB 2023)',
  aboveThreshold: false,
  reassessedAfterEachUnit: true,
  voided: null,
  recordedAt: '2026-11-30T09:20:00.000Z',
}
const threshold = { thresholdGL: 80, basis: 'Orthopaedic surgery: 80 g/L (AABB 2023)' }

async function mountDialog() {
  const wrapper = mountInApp(OutcomeTransfusionEditDialog, {
    props: { referralId: 7, transfusion: row, threshold, visible: true },
    attachTo: document.body,
  })
  const el = <T extends Element = HTMLInputElement>(selector: string) => document.querySelector<T & Element>(selector)!
  const submit = async () => {
    el<HTMLButtonElement>('[data-testid="confirm-tx-edit"]').click()
    await flushPromises()
  }
  // The dialog opens on the next turns of the event loop.
  await flushPromises()
  return { wrapper, el, submit }
}

describe('correcting a transfusion', () => {
  it('when the dialog opens, then the shared fields hold the row as recorded, with the threshold beside the Hb', async () => {
    answerFetch({})
    const { wrapper, el } = await mountDialog()
    const local = new Date(Date.parse(row.givenAt) - new Date(row.givenAt).getTimezoneOffset() * 60_000).toISOString().slice(0, 16)
    expect(el('#tx-edit-given').value).toBe(local)
    expect(el('#tx-edit-codes').value).toBe('E0336V00 E0337V00')
    expect(el('#tx-edit-pre').value).toBe('72')
    expect(el('#tx-edit-post').value).toBe('81')
    expect(el('#tx-edit-reassessed').checked).toBe(true)
    expect(el('#tx-edit-threshold').textContent).toContain('Threshold 80 g/L: Orthopaedic surgery: 80 g/L (AABB 2023)')
    // Each field is named by its label, within the dialog's own ids.
    for (const id of ['tx-edit-given', 'tx-edit-units', 'tx-edit-pre', 'tx-edit-post', 'tx-edit-codes', 'tx-edit-reason', 'tx-edit-why']) {
      expect(document.querySelector(`label[for="${id}"]`), id).not.toBeNull()
    }
    wrapper.unmount()
  })

  it('when it is saved without saying why, then the reason is asked for and nothing is sent', async () => {
    const seen = answerFetch({})
    const { wrapper, submit } = await mountDialog()
    await submit()
    await vi.waitFor(() => expect(document.querySelector('#tx-edit-why-error')?.textContent).toMatch(/reason for the correction/i))
    expect(seen).toEqual([])
    wrapper.unmount()
  })

  it('when a code is added and the reason given, then the whole corrected row is sent with the reason', async () => {
    const seen = answerFetch({ 'PUT /referrals/7/transfusions/31': { status: 200, body: { transfusion: row } } })
    const { wrapper, el, submit } = await mountDialog()
    const codes = el('#tx-edit-codes')
    codes.value = 'E0336V00, E0337V00 E0338V00'
    codes.dispatchEvent(new Event('input'))
    const why = el<HTMLTextAreaElement>('#tx-edit-why')
    why.value = 'Third bag code missed at the bedside'
    why.dispatchEvent(new Event('input'))
    await submit()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).toEqual({
      givenAt: row.givenAt,
      phase: 'after-surgery',
      component: 'red-cells',
      units: 1,
      preTransfusionHbGL: 72,
      postTransfusionHbGL: 81,
      reassessedBeforeNext: true,
      informationGiven: true,
      productCodes: ['E0336V00', 'E0337V00', 'E0338V00'],
      reason: null,
      changeReason: 'Third bag code missed at the bedside',
    })
    wrapper.unmount()
  })
})
