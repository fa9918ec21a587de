import type { Page } from 'playwright-core'
import AxeBuilder from '@axe-core/playwright'

/** axe-core's WCAG 2.x A/AA rules; only serious and critical findings are returned. */
export async function seriousViolations(page: Page): Promise<string[]> {
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
