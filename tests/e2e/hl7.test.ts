import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { ackCode, oru, send } from '../helpers/hl7'
import type { MllpListener } from '../../server/services/hl7/listener'
import { startTestListener } from '../helpers/hl7Listener'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let listener: MllpListener
let port: number
let browser: Browser
let page: Page
let nurse: StaffFixture
let admin: StaffFixture
let procedureId: number
let surgeonId: number
let referralId: number

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  ;({ listener, port } = await startTestListener(served.sequelize, served.config))
  nurse = await makeStaff('nurse')
  admin = await makeStaff('admin')
  surgeonId = (await makeStaff('surgeon')).id
  procedureId = (await makeProcedure()).id
  const p = await makePatient({ mrn: 'HLB0001', givenName: 'Morwenna', familyName: 'Penhallow', sex: 'female' })
  referralId = (await makeReferral({ patientId: p.id, procedureId, surgeonId }, { plannedSurgeryDate: addDays(todayIso(), 10) })).id
  browser = await launchBrowser()
  page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await listener?.stop()
  await served?.stop()
})

const row = () => page.locator('tbody tr', { hasText: 'Penhallow' })

describe('a result sent over MLLP reaches an open worklist', () => {
  it('when the laboratory sends an Hb while the nurse has the worklist open, then her row shows it without a reload', async () => {
    await signInThroughPage(page, served.baseUrl, nurse.email, nurse.password)
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
    await page.goto(`${served.baseUrl}/worklist`)
    await expect.poll(async () => (await row().textContent()) ?? '').toContain('Penhallow')
    await page.evaluate(() => {
      ;(globalThis as unknown as { flMarker?: string }).flMarker = 'not reloaded'
    })
    expect((await row().textContent()) ?? '').not.toContain('104')
    const [ack] = await send(port, oru({ mrn: 'HLB0001', obx: [{ value: '104', range: '120-150', flag: 'L' }] }))
    expect(ackCode(ack!)).toBe('AA')
    await expect.poll(async () => (await row().textContent()) ?? '', { timeout: 25_000, interval: 500 }).toContain('104')
    expect(await page.evaluate(() => (globalThis as unknown as { flMarker?: string }).flMarker)).toBe('not reloaded')
    await page.screenshot({ path: '/tmp/hl7-e2e-worklist.png', fullPage: true })
    // The episode shows the laboratory's own range (OBX-7) and flag (OBX-8) beside the value.
    await page.goto(`${served.baseUrl}/referrals/${referralId}`)
    const hb = page.getByTestId('results-table').locator('tr[data-analyte="hb"]')
    await expect.poll(async () => (await hb.textContent()) ?? '').toContain('120-150')
    expect(await hb.getByTestId('result-range').textContent()).toMatch(/120-150\s*low/)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/hl7-e2e-episode-range.png', fullPage: true })
  }, 90_000)
})

describe('the Interfaces screen', () => {
  it(
    'when a result for an unknown patient waits, then the admin sees the listener, outcomes and error code but no patient; the ' +
      'nurse opens it segment by segment and processes it again after registration; both screens pass axe',
    async () => {
      const [ack] = await send(port, oru({ mrn: 'HLB0999', control: 'E2E-QUEUE-1', obx: [{ value: '99' }] }))
      expect(ackCode(ack!)).toBe('AE')
      const ctx = await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })
      const adminPage = await ctx.newPage()
      await signInThroughPage(adminPage, served.baseUrl, admin.email, admin.password)
      await adminPage.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
      await adminPage.goto(`${served.baseUrl}/admin/interfaces`)
      await expect.poll(() => adminPage.getByTestId('hl7-listener').textContent()).toContain('Listening')
      const adminRow = adminPage.getByTestId('hl7-queue').locator('tbody tr', { hasText: 'E2E-QUEUE-1' })
      await expect.poll(() => adminRow.textContent()).toContain('unknown-mrn')
      await expect.poll(() => adminPage.getByTestId('hl7-error-codes').textContent()).toContain('unknown-mrn')
      const adminText = (await adminPage.locator('main').textContent()) ?? ''
      expect(adminText).not.toContain('HLB0999')
      expect(adminText).not.toContain('no patient has MRN')
      expect(await adminRow.getByRole('button').count()).toBe(0)
      expect(await seriousViolations(adminPage)).toEqual([])
      await adminPage.screenshot({ path: '/tmp/hl7-e2e-interfaces-admin.png', fullPage: true })
      await ctx.close()

      const nctx = await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })
      const nursePage = await nctx.newPage()
      await signInThroughPage(nursePage, served.baseUrl, nurse.email, nurse.password)
      await nursePage.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
      await nursePage.goto(`${served.baseUrl}/admin/interfaces`)
      const queued = nursePage.getByTestId('hl7-queue').locator('tbody tr', { hasText: 'HLB0999' })
      await expect.poll(() => queued.textContent()).toContain('no patient has MRN HLB0999')
      expect(await seriousViolations(nursePage)).toEqual([])
      await nursePage.screenshot({ path: '/tmp/hl7-e2e-interfaces-nurse.png', fullPage: true })
      await queued.getByRole('button', { name: 'Open' }).click()
      await expect.poll(() => nursePage.getByTestId('hl7-detail').textContent()).toContain('OBX-5')
      expect(await nursePage.getByTestId('hl7-detail').textContent()).toContain('MSH-10 E2E-QUEUE-1')
      expect(await seriousViolations(nursePage)).toEqual([])
      await nursePage.screenshot({ path: '/tmp/hl7-e2e-detail.png', fullPage: true })
      await nursePage.keyboard.press('Escape')
      const p = await makePatient({ mrn: 'HLB0999' })
      await makeReferral({ patientId: p.id, procedureId, surgeonId })
      await queued.getByRole('button', { name: 'Process again' }).click()
      await expect.poll(() => nursePage.getByRole('status').first().textContent()).toContain('has left the queue')
      await expect.poll(() => nursePage.getByTestId('hl7-queue').textContent()).toContain('Nothing waits for attention')
      await nctx.close()
    },
    120_000,
  )
})
