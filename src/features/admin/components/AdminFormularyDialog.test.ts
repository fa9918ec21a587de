// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import type { FormularyEntry } from '@shared/formulary/views'
import { answerFetch, mountInApp } from '@/testing/component'
import AdminFormularyDialog from './AdminFormularyDialog.vue'

afterEach(() => {
  vi.unstubAllGlobals()
  document.body.innerHTML = ''
})

// An invented product: the figures are placeholders for the dialog, not a product's label.
const product: FormularyEntry = {
  id: 4,
  code: 'iron-demo',
  name: 'Demo IV iron',
  route: 'iv',
  maxSingleDoseMg: 200,
  minIntervalDays: 2,
  source: 'Invented for this test',
  active: true,
  caution: 'Check against the local formulary and the product information.',
  dosingTable: null,
  dosedByTable: false,
}

async function mountDialog(p: FormularyEntry | null) {
  const wrapper = mountInApp(AdminFormularyDialog, { props: { product: p, visible: true }, attachTo: document.body })
  await flushPromises()
  const button = (label: string) =>
    [...document.querySelectorAll<HTMLButtonElement>('[role="dialog"] button')].find((b) => b.textContent?.trim() === label)!
  return { wrapper, button }
}

describe('the formulary product dialog', () => {
  it('when a product is added without its required figures, then the fields say so and nothing is sent', async () => {
    const seen = answerFetch({})
    const { wrapper, button } = await mountDialog(null)
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Add a product')
    button('Add product').click()
    await vi.waitFor(() => expect(document.querySelector('form#formulary-form')?.textContent).toContain('Code is required'))
    expect(seen).toEqual([])
    wrapper.unmount()
  })

  it('when a product is edited, then the changes are sent without the code, and the dialog closes', async () => {
    const seen = answerFetch({ 'PATCH /formulary/iron-demo': { status: 200, body: product } })
    const { wrapper, button } = await mountDialog(product)
    const name = document.querySelector<HTMLInputElement>('#fp-name')!
    name.value = 'Demo IV iron (renamed)'
    name.dispatchEvent(new Event('input'))
    await flushPromises()
    button('Save changes').click()
    await vi.waitFor(() => expect(seen).toHaveLength(1))
    expect(seen[0]!.body).not.toHaveProperty('code')
    expect(seen[0]!.body).toMatchObject({ name: 'Demo IV iron (renamed)', route: 'iv', maxSingleDoseMg: 200, minIntervalDays: 2 })
    await vi.waitFor(() => expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false]))
    wrapper.unmount()
  })
})
