import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { pickOption, seriousViolations, waitForStillness } from '../helpers/pathwayBrowser'
import { AuditEntry, Outcome, Referral, SurgeryDateChange, Transfusion } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let page: Page
let plannedId = 0
let operatedId = 0
let firstRow = 0
let secondRow = 0

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse', { name: 'Nurse Dates' })
  const surgeon = await makeStaff('surgeon')
  plannedId = (await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'treating', plannedSurgeryDate: addDays(todayIso(), 30) } }))
    .referral.id
  operatedId = (await makeEpisode({ surgeonId: surgeon.id, referral: { stage: 'operated' } })).referral.id
  // Referred a week ago: the rows below are given 2 and 3 hours ago, which is yesterday just after midnight,
  // and a transfusion dated before its referral's day is refused (the test failed between 00:00 and 03:00 UTC).
  await served.sequelize.query('UPDATE referrals SET created_at = ? WHERE id = ?', {
    replacements: [new Date(Date.now() - 7 * 86_400_000), operatedId],
  })
  await Outcome.create({
    referralId: operatedId,
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
  const row = (hoursAgo: number, preHb: number) =>
    Transfusion.create({
      referralId: operatedId,
      givenAt: new Date(Date.now() - hoursAgo * 3_600_000),
      phase: 'after-surgery',
      component: 'red-cells',
      units: 1,
      preTransfusionHbGL: preHb,
      postTransfusionHbGL: null,
      reassessedBeforeNext: false,
      informationGiven: true,
      productCodes: [],
      reason: null,
      thresholdGL: 80,
      thresholdBasis: 'Orthopaedic surgery: 80 g/L (AABB 2023)',
      recordedBy: null,
    })
  firstRow = (await row(3, 72)).id
  secondRow = (await row(2, 74)).id
  browser = await launchBrowser()
  page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })).newPage()
  await signInThroughPage(page, served.baseUrl, nurse.email, nurse.password)
  await page.waitForURL(`${served.baseUrl}/screening`)
  await page.selectOption('#hb-unit', 'g/L')
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const panel = () => page.getByTestId('surgery-dates')

describe('the Surgery dates panel on the episode', () => {
  it('when the nurse records the listing date from the keyboard, then it shows on the episode', async () => {
    await page.goto(`${served.baseUrl}/referrals/${plannedId}?tab=overview`)
    await panel().waitFor()
    expect(await page.getByTestId('listing-date').textContent()).toMatch(/Not recorded/)
    await page.getByTestId('edit-listing').click()
    await page.getByTestId('listing-form').waitFor()
    expect(await seriousViolations(page)).toEqual([])
    // A date in the future is refused in the form, naming the field; nothing is saved.
    await page.fill('#listing-date', addDays(todayIso(), 3))
    await page.press('#listing-date', 'Enter')
    await expect.poll(async () => (await page.getByTestId('listing-form').textContent()) ?? '').toMatch(/Listing date/i)
    expect((await Referral.findByPk(plannedId))!.listingDate).toBeNull()
    await page.fill('#listing-date', addDays(todayIso(), -10))
    await page.press('#listing-date', 'Enter')
    await page.getByTestId('listing-form').waitFor({ state: 'detached' })
    await expect.poll(async () => (await Referral.findByPk(plannedId))!.listingDate).toBe(addDays(todayIso(), -10))
    await expect.poll(async () => (await page.getByTestId('listing-date').textContent()) ?? '').not.toMatch(/Not recorded/)
  })

  it('when the nurse moves the date for anaemia, then the history shows who, when and why', async () => {
    await page.getByTestId('move-date').click()
    await page.getByTestId('move-date-form').waitFor()
    expect(await page.inputValue('#move-date')).toBe(addDays(todayIso(), 30))
    await page.fill('#move-date', addDays(todayIso(), 58))
    // Without a reason the form says so and nothing moves.
    await page.getByTestId('confirm-move-date').click()
    await expect
      .poll(async () => (await page.getByTestId('move-date-form').textContent()) ?? '')
      .toMatch(/Choose why the surgery date is changing/)
    expect(await SurgeryDateChange.count()).toBe(0)
    await pickOption(page, '#move-reason', 'Postponed for anaemia')
    await page.fill('#move-note', 'Hb 101 g/L; second iron dose first')
    expect(await seriousViolations(page)).toEqual([])
    await page.getByTestId('confirm-move-date').click()
    await page.getByTestId('move-date-form').waitFor({ state: 'detached' })
    const history = page.getByTestId('date-history')
    await history.waitFor()
    expect(await history.textContent()).toMatch(/Nurse Dates.*→.*Postponed for anaemia.*second iron dose first/)
  })

  it('when the nurse cancels the operation, then the reason is required, and the episode shows it cancelled until rebooked', async () => {
    await page.getByTestId('cancel-op').click()
    await page.getByTestId('cancel-op-form').waitFor()
    await page.getByTestId('confirm-cancel-op').click()
    await expect.poll(async () => (await page.getByTestId('cancel-op-form').textContent()) ?? '').toMatch(/reason .*is required/i)
    expect(await SurgeryDateChange.count({ where: { kind: 'cancelled' } })).toBe(0)
    await pickOption(page, '#cancel-op-reason', 'Cancelled for anaemia')
    await page.fill('#cancel-op-note', 'Hb 92 g/L at pre-assessment')
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/surgery-dates-cancel-dialog.png', fullPage: false })
    await page.getByTestId('confirm-cancel-op').click()
    await page.getByTestId('cancel-op-form').waitFor({ state: 'detached' })
    await expect
      .poll(async () => (await page.getByTestId('operation-cancelled').textContent()) ?? '')
      .toMatch(/^\s*Cancelled for anaemia\s*$/)
    expect(await page.getByTestId('date-history').textContent()).toMatch(/cancelled.*Cancelled for anaemia.*Hb 92/)
    expect(await page.getByTestId('move-date').textContent()).toMatch(/Rebook/)
    expect(await page.getByTestId('cancel-op').count()).toBe(0)
    expect(await AuditEntry.count({ where: { action: 'cancel', entity: 'planned-operation' } })).toBe(1)
    expect(await seriousViolations(page)).toEqual([])
    await panel().scrollIntoViewIfNeeded()
    await page.screenshot({ path: '/tmp/surgery-dates-panel.png', fullPage: true })
  })
})

describe('correcting and voiding a transfusion row', () => {
  it('when the nurse voids a row from the keyboard, then the reason is required and the row stays struck through', async () => {
    await page.goto(`${served.baseUrl}/referrals/${operatedId}?tab=after-surgery`)
    await page.getByTestId('tx-table').waitFor()
    await page
      .getByRole('button', { name: /^Void: Red cells/ })
      .first()
      .focus()
    await page.keyboard.press('Enter')
    await page.getByTestId('tx-void-form').waitFor()
    await waitForStillness(page)
    expect(await seriousViolations(page)).toEqual([])
    // Keyboard only: the reason box, then the dialog's buttons.
    await page.focus('#tx-void-reason')
    await page.keyboard.press('Tab')
    await page.keyboard.press('Tab')
    await page.keyboard.press('Enter')
    await expect.poll(async () => (await page.getByTestId('tx-void-form').textContent()) ?? '').toMatch(/reason for voiding is required/i)
    expect((await Transfusion.findByPk(firstRow))!.voidedAt).toBeNull()
    await page.focus('#tx-void-reason')
    await page.keyboard.type('Entered against the wrong patient episode')
    await page.keyboard.press('Tab')
    await page.keyboard.press('Tab')
    await page.keyboard.press('Enter')
    await page.getByTestId('tx-void-form').waitFor({ state: 'detached' })
    await expect
      .poll(async () => (await page.getByTestId('tx-table').textContent()) ?? '')
      .toMatch(/voided: Entered against the wrong patient episode/)
    expect((await Transfusion.findByPk(firstRow))!.voidReason).toBe('Entered against the wrong patient episode')
  })

  it(
    'when the nurse corrects the other row with the re-check, then the reason for the correction is required and the row counts as ' +
      'reassessed',
    async () => {
      await page.getByRole('button', { name: /^Correct: Red cells/ }).click()
      await page.getByTestId('tx-edit-form').waitFor()
      await waitForStillness(page)
      // The dialog opens on the row as recorded, given-at time included.
      expect(await page.inputValue('#tx-edit-given')).toMatch(/^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}$/)
      expect(await page.inputValue('#tx-edit-pre')).toBe('74')
      expect(await seriousViolations(page)).toEqual([])
      await page.click('#tx-edit-post')
      await page.keyboard.type('83')
      await page.click('label[for="tx-edit-reassessed"]')
      await page.getByTestId('confirm-tx-edit').click()
      await expect
        .poll(async () => (await page.getByTestId('tx-edit-form').textContent()) ?? '')
        .toMatch(/Give the reason for the correction/)
      expect((await Transfusion.findByPk(secondRow))!.postTransfusionHbGL).toBeNull()
      await page.fill('#tx-edit-why', 'Re-check Hb came back after the entry')
      await page.screenshot({ path: '/tmp/transfusion-correct-dialog.png', fullPage: false })
      await page.getByTestId('confirm-tx-edit').click()
      await page.getByTestId('tx-edit-form').waitFor({ state: 'detached' })
      await expect.poll(async () => (await Transfusion.findByPk(secondRow))!.postTransfusionHbGL).toBe(83)
      expect((await Transfusion.findByPk(secondRow))!.reassessedBeforeNext).toBe(true)
      await expect.poll(async () => (await page.getByTestId('tx-table').textContent()) ?? '').toMatch(/83 g\/L/)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '/tmp/transfusions-corrected.png', fullPage: true })
    },
  )
})
