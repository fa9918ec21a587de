import type { Page } from 'playwright-core'

/** Answers "No" to every IV-iron caution question on the prescription form. */
export async function answerCautionsNo(page: Page): Promise<void> {
  for (const key of ['previousHypersensitivity', 'activeInfection', 'firstTrimester', 'severeLiverDisease']) {
    await page.click(`label[for="caution-${key}-no"]`)
  }
}

/** Replaces the amount in a PrimeVue InputNumber the way a person would: select it all, type, leave. */
export async function retype(page: Page, selector: string, text: string): Promise<void> {
  const input = page.locator(selector)
  await input.click()
  await input.press('ControlOrMeta+a')
  await input.pressSequentially(text)
  await input.press('Tab')
}
