import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { retype } from '../helpers/clinicBrowser'
import { Outcome, Transfusion } from '../../server/models/index'
import { factsAfterHandWrites } from '../helpers/episodeFacts'
import { todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let doctor: StaffFixture
let referralId = 0
let nursePage: Page
let doctorPage: Page

const outcomeToday = (id: number) =>
  Outcome.create({
    referralId: id,
    surgeryDate: todayIso(),
    bloodLossMl: 900,
    unitsTransfusedIntraOp: 0,
    unitsTransfusedPostOp: 0,
    unitsCrossmatched: 2,
    lowestHbGL: 72,
    dischargeHbGL: null,
    lengthOfStayDays: 4,
    complications: ['none'],
    recordedBy: null,
  })

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  doctor = await makeStaff('doctor')
  const surgeon = await makeStaff('surgeon')
  // Orthopaedics (factory): threshold 80 g/L (AABB 2023).
  const { referral } = await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'operated' } })
  referralId = referral.id
  await outcomeToday(referral.id)
  // Another episode already had two units given at once: reassessed-after-each-unit starts at 0 of 1.
  const other = await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'operated' } })
  await outcomeToday(other.referral.id)
  await Transfusion.create({
    referralId: other.referral.id,
    givenAt: new Date(Date.now() - 3_600_000),
    phase: 'after-surgery',
    component: 'red-cells',
    units: 2,
    preTransfusionHbGL: 70,
    postTransfusionHbGL: null,
    reassessedBeforeNext: false,
    informationGiven: true,
    productCodes: [],
    reason: null,
    thresholdGL: 80,
    thresholdBasis: 'Orthopaedic surgery: 80 g/L (AABB 2023)',
    recordedBy: null,
  })
  await factsAfterHandWrites()
  browser = await launchBrowser()
  nursePage = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })).newPage()
  doctorPage = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const measure = (page: Page, id: string) => page.locator(`[data-measure="${id}"] [data-testid="measure-figure"]`).textContent()

describe('a two-unit transfusion recorded as two single units moves the QS138 reassessment measure', () => {
  it('when the doctor opens Quality first, then the reassessment measure reads 0 of 1 with its definition and benchmark', async () => {
    await signInThroughPage(doctorPage, served.baseUrl, doctor.email, doctor.password)
    await doctorPage.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
    await doctorPage.goto(`${served.baseUrl}/quality`)
    await doctorPage
      .getByTestId('quality-measures')
      .waitFor({ timeout: 10_000 })
      .catch(async (e) => {
        await doctorPage.screenshot({ path: '/tmp/quality-fail.png', fullPage: true })
        throw new Error(`${String(e)}\n${await doctorPage.locator('body').innerText()}`)
      })
    expect(await measure(doctorPage, 'reassessed-after-each-unit')).toMatch(/0 of 1 \(0 %\)/)
    const row = (await doctorPage.locator('[data-measure="reassessed-after-each-unit"]').textContent()) ?? ''
    expect(row).toMatch(/statement 3/)
    expect(row).toMatch(/63\.6 %/)
    expect(row).toMatch(/Numerator:/)
    expect(await seriousViolations(doctorPage)).toEqual([])
  })

  it(
    'when the nurse enters two single units from the keyboard with a ' + 're-check between, then both are listed against the threshold',
    async () => {
      await signInThroughPage(nursePage, served.baseUrl, nurse.email, nurse.password)
      await nursePage.waitForURL(`${served.baseUrl}/screening`)
      await nursePage.selectOption('#hb-unit', 'g/L')
      await nursePage.goto(`${served.baseUrl}/referrals/${referralId}?tab=after-surgery`)
      await nursePage.getByTestId('transfusion-form').waitFor()
      expect(await nursePage.getByTestId('tx-threshold').textContent()).toMatch(/80 g\/L.*AABB 2023/)

      // Unit 1: below the threshold.
      await retype(nursePage, '#tx-pre', '72')
      await expect
        .poll(() => nursePage.getByTestId('tx-against-threshold').textContent())
        .toMatch(/72 g\/L is below this patient's threshold of 80 g\/L/)
      await retype(nursePage, '#tx-post', '81')
      await nursePage.click('label[for="tx-reassessed"]')
      await nursePage.click('label[for="tx-informed"]')
      await nursePage.fill('#tx-codes', 'E0336V00')
      await nursePage.press('#tx-codes', 'Enter')
      await expect.poll(() => nursePage.getByTestId('tx-saved').textContent()).toMatch(/1 saved/)
      await expect.poll(() => nursePage.evaluate('document.activeElement && document.activeElement.id')).toBe('tx-given')

      // Unit 2, after the re-check of 81 g/L: above the threshold, so a reason is asked for.
      await retype(nursePage, '#tx-pre', '81')
      await expect
        .poll(() => nursePage.getByTestId('tx-against-threshold').textContent())
        .toMatch(/above this patient's threshold.*Give the reason/)
      await retype(nursePage, '#tx-post', '89')
      await nursePage.click('label[for="tx-reassessed"]')
      await nursePage.fill('#tx-codes', 'E0336V00')
      await nursePage.press('#tx-codes', 'Enter')
      await expect
        .poll(async () => (await nursePage.locator('#tx-reason').locator('xpath=..').textContent()) ?? '')
        .toMatch(/above 80 g\/L/)
      expect(await Transfusion.count({ where: { referralId } })).toBe(1)
      await nursePage.fill('#tx-reason', 'Breathless on the ward after the first unit')
      await nursePage.press('#tx-reason', 'Enter')
      await expect.poll(() => nursePage.getByTestId('tx-saved').textContent()).toMatch(/2 saved/)
      await expect.poll(() => nursePage.getByTestId('tx-table').locator('tbody tr').count()).toBe(2)
      expect(await nursePage.getByTestId('tx-units').textContent()).toMatch(/2 after surgery/)
      expect(await nursePage.getByTestId('tx-table').textContent()).toMatch(/Above 80 g\/L: Breathless/)
      expect((await Outcome.findOne({ where: { referralId } }))!.unitsTransfusedPostOp).toBe(2)
      expect(await seriousViolations(nursePage)).toEqual([])
      await nursePage.screenshot({ path: '/tmp/transfusions-after-surgery.png', fullPage: true })
    },
  )

  it('when the doctor reloads Quality, then reassessed-after-each-unit has moved to 2 of 3', async () => {
    await doctorPage.reload()
    await doctorPage.getByTestId('quality-measures').waitFor()
    await expect.poll(() => measure(doctorPage, 'reassessed-after-each-unit')).toMatch(/2 of 3 \(66\.7 %\)/)
    expect(await measure(doctorPage, 'single-unit-red-cell-transfusions')).toMatch(/2 of 3/)
    await doctorPage.getByTestId('quality-trend').waitFor()
    expect(await doctorPage.getByTestId('national-audit-csv').count()).toBe(1)
    expect(await seriousViolations(doctorPage)).toEqual([])
    await doctorPage.screenshot({ path: '/tmp/quality-screen.png', fullPage: true })
  })
})
