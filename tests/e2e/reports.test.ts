import { readFile } from 'node:fs/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { makeReportFixture, parseCsv } from '../api/reports-fixture'

let served: ServedApp
let browser: Browser
let doctor: StaffFixture

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await makeReportFixture(served.sequelize)
  doctor = await makeStaff('doctor')
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/**
 * Each test signs in its own page. The report fixture is only read, never changed, so sharing it
 * leaves nothing for one test to depend on from another.
 */
async function doctorPage(): Promise<Page> {
  const page = await newTestPage(browser, { viewport: { width: 1280, height: 900 }, acceptDownloads: true })
  await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
  await page.waitForURL(`${served.baseUrl}/clinic`)
  return page
}

/** A report for 2025 opened from its address, as a shared link would open it. */
async function report2025(page: Page, name: string): Promise<void> {
  await page.goto(`${served.baseUrl}/reports?report=${name}&from=2025-01-01&to=2025-12-31`)
}

describe('a doctor reads the service funnel', () => {
  it('when the 2025 period is chosen, then the chart and the table show the hand-counted funnel with its definitions', async () => {
    const page = await doctorPage()
    await page.click('[data-nav="reports"]')
    await page.waitForURL(/\/reports/)
    await page.fill('#rp-from', '2025-01-01')
    await page.fill('#rp-to', '2025-12-31')
    await page.waitForURL(/from=2025-01-01&to=2025-12-31|to=2025-12-31.*from=2025-01-01/)
    const table = page.locator('[data-report-table="funnel"]')
    await table.locator('canvas').waitFor()
    // Hand count in tests/api/reports-fixture.ts and reports-figures.test.ts: 4 referred, 3 screened,
    // 2 anaemic or iron deficient, 1 treated, 1 re-checked, 2 cleared, 3 operated, 2 of 3 screened ≥ 28 days before.
    const cells = async () =>
      table
        .locator('tbody tr')
        .evaluateAll((rows) => rows.map((r) => [...r.querySelectorAll('td')].map((td) => td.textContent?.trim() ?? '')))
    await expect.poll(async () => (await cells()).map((c) => c[1])).toEqual(['4', '3', '2', '1', '1', '2', '3', '2'])
    expect((await cells())[7]).toEqual(['Screened ≥ 28 days before surgery', '2', '66.7'])
    const definitions = await table.getByTestId('report-definition').allTextContents()
    expect(definitions.find((d) => d.startsWith('Screened ≥ 28 days'))).toMatch(
      /Out of:\s*Operated episodes.*Period:.*2025-01-01 to 2025-12-31/,
    )
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/reports-funnel.png', fullPage: true })

    const [download] = await Promise.all([page.waitForEvent('download'), table.locator('[data-csv="funnel"]').click()])
    const rows = parseCsv(await readFile((await download.path())!, 'utf8'))
    // The CSV keeps the API's keys (RFC 4180 fields); its rows are the rows on screen, in order.
    expect(rows.map((r) => [r.label, r.count, r.percent])).toEqual((await cells()).map((c) => [c[0], c[1], c[2]]))
    await page.context().close()
  })

  it('when the Hb and waiting-time reports are opened, then each is drawn and its table is the text alternative', async () => {
    const page = await doctorPage()
    await report2025(page, 'funnel')
    await page.locator('[data-report-table="funnel"] canvas').waitFor()
    for (const [tab, table] of [
      ['haemoglobin', 'distribution'],
      ['waiting-times', 'waitingTimes'],
    ] as const) {
      await page.click(`[data-tab="${tab}"]`)
      const section = page.locator(`[data-report-table="${table}"]`)
      await section.locator('canvas').waitFor()
      expect(await section.locator('[role="img"]').getAttribute('aria-label')).toMatch(/same figures are in the table below/)
      expect(await section.locator('tbody tr').count()).toBeGreaterThan(0)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: `/tmp/reports-${tab}.png`, fullPage: true })
    }
    await page.context().close()
  })

  it('when the blood-ordering report is opened, then it shows the indices and the observed vs catalogue loss', async () => {
    const page = await doctorPage()
    await report2025(page, 'funnel')
    await page.locator('[data-report-table="funnel"] canvas').waitFor()
    await page.click('[data-tab="blood-ordering"]')
    const table = page.locator('[data-report-table="bloodOrdering"]')
    await table.locator('tbody tr').first().waitFor()
    const headers = await table.locator('thead th').allTextContents()
    expect(headers.join('|')).toMatch(/C:T ratio.*T \(%\).*TI.*Suggested change.*Observed mean loss \(mL\).*Catalogue usual loss \(mL\)/)
    // KNEE: E1 600 mL and E2 400 mL → mean 500 mL against the catalogue's 500 mL (fixture).
    const knee = table.locator('tbody tr', { hasText: 'KNEE' })
    expect(await knee.textContent()).toMatch(/500/)
    // KNEE: 4 units crossmatched for 1 transfused → C:T 4.0 > 2.5 (clinical reference §9): fewer units.
    const summary = (await page.locator('[data-operation="KNEE"]').textContent()) ?? ''
    expect(summary).toMatch(/Crossmatch fewer units/)
    expect(summary).toMatch(/observed mean 500 mL, catalogue usual 500 mL/)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/reports-blood-ordering.png', fullPage: true })
    expect(await page.getByTestId('catalogue-link').count()).toBe(0)
    await page.context().close()
  })

  it('when an admin opens the same audit, then it links to the operations catalogue to recalibrate', async () => {
    const admin = await makeStaff('admin')
    const adminPage = await newTestPage(browser)
    await signInThroughPage(adminPage, served.baseUrl, admin.email, admin.password)
    await adminPage.waitForURL(`${served.baseUrl}/admin`)
    await adminPage.goto(`${served.baseUrl}/reports?report=blood-ordering&from=2025-01-01&to=2025-12-31`)
    await adminPage.getByTestId('catalogue-link').click()
    await adminPage.waitForURL(`${served.baseUrl}/admin/operations`)
    await adminPage.context().close()
  })
})
