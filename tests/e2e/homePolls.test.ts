import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestContext, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff } from '../helpers/factories'

/**
 * Issue #19: an open home screen polls its count tiles in one request, asks conditionally (a 304
 * when nothing changed), and goes quiet while the tab is hidden. Watched in real Chromium.
 */
let served: ServedApp
let browser: Browser

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** As the browser does when the person switches tab: the state changes and an event fires. */
async function setHidden(page: Page, hidden: boolean): Promise<void> {
  await page.evaluate(`(() => {
    const h = ${hidden}
    Object.defineProperty(document, 'visibilityState', { configurable: true, get: () => (h ? 'hidden' : 'visible') })
    Object.defineProperty(document, 'hidden', { configurable: true, get: () => h })
    document.dispatchEvent(new Event('visibilitychange', { bubbles: true }))
  })()`)
}

describe("the doctor's home while it stays open", () => {
  it('then the six tiles poll as one conditional request, and nothing is asked while the tab is hidden', async () => {
    const doctor = await makeStaff('doctor')
    const context = await newTestContext(browser)
    const page = await context.newPage()
    const seen: { path: string; search: string; status: number }[] = []
    page.on('response', (r) => {
      const url = new URL(r.url())
      if (url.pathname.startsWith('/api/')) seen.push({ path: url.pathname, search: url.search, status: r.status() })
    })
    await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
    await page.waitForURL(`${served.baseUrl}/clinic`)
    await expect.poll(() => page.getByTestId('worklist-count').allTextContents()).toEqual(['0', '0', '0', '0', '0', '0'])

    await page.waitForTimeout(18_000) // two 8-second polls
    const counts = seen.filter((r) => r.path === '/api/worklist/counts')
    expect(counts.length).toBeGreaterThanOrEqual(2)
    expect(counts.length).toBeLessThanOrEqual(4)
    expect(counts.slice(1).map((r) => r.status)).toContain(304) // nothing changed, nothing resent
    // The tiles no longer ask the worklist one by one.
    expect(seen.filter((r) => r.path === '/api/worklist' && new URLSearchParams(r.search).get('pageSize') === '1')).toEqual([])

    await setHidden(page, true)
    await page.waitForTimeout(500)
    const before = seen.length
    await page.waitForTimeout(12_000)
    expect(seen.slice(before)).toEqual([])

    await setHidden(page, false)
    await expect.poll(() => seen.slice(before).some((r) => r.path === '/api/worklist/counts')).toBe(true)
    await context.close()
  })
})
