import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { loadStarterFormulary, makeEpisode } from '../helpers/clinicFactories'
import { pickOption, seriousViolations } from '../helpers/pathwayBrowser'
import { retype } from '../helpers/clinicBrowser'
import { Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

const SHOTS = process.env.FERROLANE_SCREENSHOTS // a directory to save screenshots in, when set
let served: ServedApp
let browser: Browser
let doctor: StaffFixture
let page: Page
let referralId = 0

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  doctor = await makeStaff('doctor')
  const surgeon = await makeStaff('surgeon')
  // A woman of 66 (invented), 60 kg, Hb 95 g/L, iron deficient, low B12, surgery in 10 days.
  const { patient, referral } = await makeEpisode({
    surgeonId: surgeon.id,
    weightKg: 60,
    heightCm: 160,
    hb: [{ hbGL: 95 }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 10), stage: 'clinic' },
  })
  await Result.create({
    referralId: referral.id,
    patientId: patient.id,
    analyte: 'b12',
    valueCanonical: 150,
    unitCanonical: 'ng/L',
    valueReported: 150,
    unitReported: 'ng/L',
    takenAt: new Date(Date.now() - 3_600_000),
    enteredBy: null,
    derivedFrom: null,
  })
  referralId = referral.id
  browser = await launchBrowser()
  page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 1600 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const text = async (testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''
const shot = async (testId: string) => {
  if (SHOTS)
    await page
      .getByTestId(testId)
      .first()
      .screenshot({ path: `${SHOTS}/${testId}.png` })
}

describe('a doctor sees size, age and the surgery date in the dose plan', () => {
  it(
    'when ferric carboxymaltose is picked 10 days before surgery, then the need comes from its product table and the timing caution ' +
      'shows',
    async () => {
      await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
      await page.waitForURL(`${served.baseUrl}/clinic`)
      await page.goto(`${served.baseUrl}/referrals/${referralId}?tab=clinic`)
      await pickOption(page, '#rx-product', 'Ferric carboxymaltose (IV)')
      // Ferinject SmPC 4.2 Table 1: 35 to <70 kg and Hb < 10 g/dL → 1500 mg.
      await expect.poll(() => text('dose-deficit')).toMatch(/1500\s*mg/)
      expect(await text('dose-method')).toMatch(/Product dosing table \(Ferinject SmPC 4\.2, Table 1/)
      expect(await text('dose-timing')).toMatch(/too late to raise Hb before surgery; consider post-operative iron/)
      await page.getByTestId('dose-plan').scrollIntoViewIfNeeded()
      await shot('dose-plan')
    },
  )

  it('then the review panel shows the work-up prompts, each with its source', async () => {
    expect(await text('prompt-b12-deficiency')).toMatch(/Devalia et al\., Br J Haematol 2014/)
    expect(await text('prompt-gi-investigation')).toMatch(/woman aged 66 \(taken as post-menopausal\).*Snook et al\., Gut 2021/)
    expect(await page.locator('body').textContent()).not.toMatch(/from memory/)
    await page.getByTestId('workup-prompts').scrollIntoViewIfNeeded()
    await shot('workup-prompts')
  })

  it('then the clinic tab passes axe', async () => {
    expect(await seriousViolations(page)).toEqual([])
  })
})

describe('a doctor enters an Hb whose unit is ambiguous', () => {
  it('when 8.5 is typed from an outside laboratory in mmol/L, then the value shows in all three units and must be confirmed', async () => {
    await page.goto(`${served.baseUrl}/referrals/${referralId}?tab=overview`)
    await pickOption(page, '#result-source', 'Outside laboratory reporting mmol/L')
    await retype(page, '#result-value', '8.5')
    await page.locator('#result-value').blur()
    await expect.poll(() => text('hb-units')).toMatch(/137 g\/L = 13\.7 g\/dL = 8\.5 mmol\/L/)
    expect(await text('hb-unit-confirm')).toMatch(/fits both g\/dL .* and mmol\/L/)
    await page.getByTestId('hb-units').scrollIntoViewIfNeeded()
    await shot('hb-units')
    const before = await Result.count()
    await page.getByRole('button', { name: 'Save result' }).click()
    await expect.poll(() => page.getByText('Confirm the unit before saving.').count()).toBe(1)
    expect(await Result.count()).toBe(before)
    await page.locator('#result-unit-confirmed').check()
    await page.getByRole('button', { name: 'Save result' }).click()
    await expect.poll(() => Result.count()).toBe(before + 1)
  })

  it('then the results tab passes axe', async () => {
    expect(await seriousViolations(page)).toEqual([])
  })
})
