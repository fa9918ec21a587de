// @vitest-environment jsdom
import { afterEach, describe, expect, it } from 'vitest'
import { flushPromises } from '@vue/test-utils'
import { mountInApp } from '@/testing/component'
import FormDialog from './FormDialog.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const props = {
  visible: true,
  header: 'A change to record',
  width: '30rem',
  formId: 'frame-form',
  failure: null as string | null,
  closeLabel: 'Close without saving',
  submitLabel: 'Save it',
  submitIcon: 'pi pi-check',
  submitTestid: 'confirm-frame',
  pending: false,
}
const slots = { intro: '<p class="intro">Words above the fields.</p>', default: '<label for="f">A field</label><input id="f" />' }

describe('the frame of a dialog holding one form', () => {
  it('when it opens, then the words, the fields and a submit button that names the form stand in one modal dialog', async () => {
    const wrapper = mountInApp(FormDialog, { props, slots, attachTo: document.body })
    await flushPromises()
    const dialog = document.querySelector('[role="dialog"]')!
    expect(dialog.getAttribute('aria-modal')).toBe('true')
    expect(dialog.textContent).toContain('A change to record')
    const form = dialog.querySelector('form#frame-form')!
    expect(form.getAttribute('data-testid')).toBe('frame-form')
    expect(form.querySelector('.intro')?.textContent).toBe('Words above the fields.')
    expect(form.querySelector('input#f')).not.toBeNull()
    expect(dialog.querySelector('[data-testid="confirm-frame"]')?.getAttribute('form')).toBe('frame-form')
    wrapper.unmount()
  })

  it('when the form is submitted, then the dialog hands the event on; a refusal shows above the fields; Close closes', async () => {
    const wrapper = mountInApp(FormDialog, {
      props: { ...props, failure: 'Someone changed this episode' },
      slots,
      attachTo: document.body,
    })
    await flushPromises()
    document.querySelector('form#frame-form')!.dispatchEvent(new Event('submit', { cancelable: true }))
    expect(wrapper.emitted('submit')).toHaveLength(1)
    const form = document.querySelector('form#frame-form')!
    expect(form.textContent).toMatch(/Words above the fields\.\s*Someone changed this episode/)
    const close = [...document.querySelectorAll<HTMLButtonElement>('[role="dialog"] button')].find(
      (b) => b.textContent?.trim() === 'Close without saving',
    )!
    close.click()
    await flushPromises()
    expect(wrapper.emitted('update:visible')?.at(-1)).toEqual([false])
    wrapper.unmount()
  })
})
