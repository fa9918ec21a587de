import type { Page } from 'playwright-core'
import AxeBuilder from '@axe-core/playwright'

/*
 * True once nothing on the page is moving: no Vue <Transition> class left on an element and no
 * finite CSS animation or transition running (endless ones, such as a spinner, are ignored).
 * PrimeVue's modal mask keeps "p-overlay-mask-enter-active" for as long as the dialog is open, so
 * it is left out. A string, because the tests are type-checked without the DOM library.
 */
const MOVING = ['-enter-active', '-leave-active', '-enter-from', '-leave-to'].map((c) => `[class*="${c}"]:not(.p-overlay-mask)`).join(', ')
const AT_REST = `!document.querySelector('${MOVING}')
  && !document.getAnimations().some((a) => a.playState === 'running' && a.effect && a.effect.getComputedTiming().endTime !== Infinity)`

/**
 * Waits for enter/leave transitions to end, so what is checked is what a reader sees at rest.
 * Polled with page.evaluate: waitForFunction evaluates its predicate in the page, which the app's
 * Content-Security-Policy (no 'unsafe-eval') refuses.
 */
export async function waitForStillness(page: Page, timeoutMs = 10_000): Promise<void> {
  const until = Date.now() + timeoutMs
  while (!(await page.evaluate(AT_REST))) {
    if (Date.now() > until) {
      const what = await page.evaluate(
        `[...document.querySelectorAll('${MOVING}')].map((e) => e.className).join(' | ') || 'a CSS animation'`,
      )
      throw new Error(`the page was still moving after ${timeoutMs} ms: ${String(what)}`)
    }
    await new Promise((r) => setTimeout(r, 50))
  }
}

/** axe-core's WCAG 2.x A/AA rules, on a page at rest; only serious and critical findings are returned. */
export async function seriousViolations(page: Page): Promise<string[]> {
  await waitForStillness(page)
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21aa', 'wcag22aa']).analyze()
  return results.violations
    .filter((v) => v.impact === 'serious' || v.impact === 'critical')
    .map((v) => `${v.id}: ${v.help} (${v.nodes.map((n) => n.target.join(' ')).join(', ')})`)
}

/** Opens a PrimeVue Select by its labelled trigger and picks the option with this name. */
export async function pickOption(page: Page, triggerSelector: string, option: string | RegExp): Promise<void> {
  await page.click(triggerSelector)
  await page.getByRole('option', { name: option }).first().click()
}
