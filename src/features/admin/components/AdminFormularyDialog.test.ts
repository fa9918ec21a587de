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

  it('when a product was edited and the dialog closed, then "Add" opens an empty form, not that product\'s caps', async () => {
    // Every cap filled in, so a leak of any of them shows.
    const capped: FormularyEntry = {
      ...product,
      maxSingleDoseMgPerKg: 20,
      maxWeeklyMg: 1000,
      maxTotalMg: 2000,
      roundToMg: 100,
      licensedFromAgeYears: 14,
      paediatricMaxSingleDoseMgPerKg: 15,
      paediatricMaxSingleDoseMg: 500,
      phosphateCheckOnRepeat: true,
      active: false,
    }
    answerFetch({})
    const { wrapper, button } = await mountDialog(capped)
    expect(document.querySelector<HTMLInputElement>('#fp-name')?.value).toBe('Demo IV iron')
    button('Cancel').click()
    await flushPromises()
    await wrapper.setProps({ visible: false })
    // As the list page does: the entry is cleared and the dialog opened in the same tick.
    await wrapper.setProps({ product: null, visible: true })
    await flushPromises()
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Add a product')
    const value = (id: string) => document.querySelector<HTMLInputElement>(`#${id}`)?.value
    for (const id of ['fp-code', 'fp-name', 'fp-max', 'fp-perkg', 'fp-interval', 'fp-weekly', 'fp-total', 'fp-step'])
      expect(value(id), id).toBe('')
    for (const id of ['fp-age', 'fp-child-perkg', 'fp-child-max', 'fp-source']) expect(value(id), id).toBe('')
    expect(document.querySelector<HTMLInputElement>('#fp-phosphate')?.checked).toBe(false)
    expect(document.querySelector<HTMLInputElement>('#fp-active')?.checked).toBe(true)
    expect(document.querySelector('[role="dialog"]')?.textContent).toContain('Intravenous')
    wrapper.unmount()
  })
})
