// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import type { ProcedureView } from '@shared/pathway/views'
import { answerFetch, mountInApp } from '@/testing/component'
import { bloodOrderText } from '@/display/labels'
import AdminCatalogueDialog from './AdminCatalogueDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// An invented catalogue entry.
const hip: ProcedureView = {
  code: 'THR',
  name: 'Total hip replacement',
  specialty: 'Orthopaedics',
  expectedBloodLossMl: 900,
  transfusionRate: 0.1,
  usualBloodOrder: 'group-and-screen',
  usualUnits: 0,
  source: 'Set locally (demo)',
  active: true,
}

async function mountDialog(procedure: ProcedureView | null) {
  const wrapper = mountInApp(AdminCatalogueDialog, { props: { procedure, visible: true }, attachTo: document.body })
  await flushPromises()
  const type = (selector: string, value: string) => {
    const input = document.querySelector<HTMLInputElement>(selector)!
    input.value = value
    input.dispatchEvent(new Event('input'))
  }
  const button = (label: string) =>
    [...document.querySelectorAll<HTMLButtonElement>('[role="dialog"] button')].find((b) => b.textContent?.trim() === label)!
  return { wrapper, type, button }
}

describe('the operation dialog', () => {
  it('when an operation is added, then its code and figures are sent with the usual defaults, and the dialog closes', async () => {
    const seen = answerFetch({ 'POST /procedures': { status: 201, body: hip } })
    const { wrapper, type, button } = await mountDialog(null)
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Add an operation')
    type('#op-code', 'THR')
    type('#op-name', 'Total hip replacement')
    type('#op-specialty', 'Orthopaedics')
    type('#op-source', 'Set locally (demo)')
    await flushPromises()
    button('Add operation').click()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).toMatchObject({
      code: 'THR',
      name: 'Total hip replacement',
      specialty: 'Orthopaedics',
      source: 'Set locally (demo)',
      usualBloodOrder: 'group-and-screen',
      usualUnits: 0,
      active: true,
    })
    await vi.waitFor(() => expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false]))
    wrapper.unmount()
  })

  it('when an operation is edited, then its code is not sent, and a refusal shows above the fields', async () => {
    const seen = answerFetch({
      'PATCH /procedures/THR': { status: 409, body: { error: { code: 'conflict', message: 'The catalogue changed meanwhile' } } },
    })
    const { wrapper, type, button } = await mountDialog(hip)
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Edit Total hip replacement')
    expect(document.querySelector('#op-code')).toBeNull()
    type('#op-specialty', 'Trauma and orthopaedics')
    await flushPromises()
    button('Save changes').click()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).not.toHaveProperty('code')
    expect(seen[0]!.body).toMatchObject({ name: 'Total hip replacement', specialty: 'Trauma and orthopaedics' })
    await vi.waitFor(() => expect(document.querySelector('form#catalogue-form')?.textContent).toContain('The catalogue changed meanwhile'))
    button('Cancel').click()
    await flushPromises()
    expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false])
    wrapper.unmount()
  })

  it('when an operation was edited and the dialog closed, then "Add" opens an empty form with the usual defaults', async () => {
    answerFetch({})
    const crossmatched: ProcedureView = { ...hip, usualBloodOrder: 'crossmatch', usualUnits: 2, active: false }
    const { wrapper, button } = await mountDialog(crossmatched)
    expect(document.querySelector<HTMLInputElement>('#op-name')?.value).toBe('Total hip replacement')
    button('Cancel').click()
    await flushPromises()
    await wrapper.setProps({ visible: false })
    // As the list page does: the entry is cleared and the dialog opened in the same tick.
    await wrapper.setProps({ procedure: null, visible: true })
    await flushPromises()
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Add an operation')
    const value = (id: string) => document.querySelector<HTMLInputElement>(`#${id}`)?.value
    for (const id of ['op-code', 'op-name', 'op-specialty', 'op-loss', 'op-rate', 'op-source']) expect(value(id), id).toBe('')
    expect(value('op-units')).toBe('0')
    expect(document.querySelector<HTMLInputElement>('#op-active')?.checked).toBe(true)
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain(bloodOrderText({ kind: 'group-and-screen', units: 0 }))
    wrapper.unmount()
  })
})
