import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeProcedure } from '../helpers/pathwayFactories'
import { pickOption, seriousViolations } from '../helpers/pathwayBrowser'
import { Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let doctor: StaffFixture
const SURGEON_NAME = 'Ms Imelda Brackenridge'
const OPERATION = 'Knee replacement (browser test)'
const FAMILY = 'Quillbarrow'
const FLAG = 'Surgery soon, still anaemic'

// Both sessions stay open across the steps below, like two people at two desks.
let nurseContext: BrowserContext
let nursePage: Page
let doctorContext: BrowserContext
let doctorPage: Page
let episodeUrl = ''

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  doctor = await makeStaff('doctor')
  await makeStaff('surgeon', { name: SURGEON_NAME })
  await makeProcedure({ code: 'TKRB', name: OPERATION, expectedBloodLossMl: 500 })
  browser = await launchBrowser()
  nurseContext = await browser.newContext({ locale: 'en-GB' })
  nursePage = await nurseContext.newPage()
  doctorContext = await browser.newContext({ locale: 'en-GB' })
  doctorPage = await doctorContext.newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** The worklist row for the test patient, as the doctor's page shows it now. */
const doctorRow = () => doctorPage.locator('tbody tr', { hasText: FAMILY })

describe('a nurse registers a patient and enters a low Hb; a colleague sees it live', () => {
  it('when the doctor opens the worklist first, then it has no such patient yet', async () => {
    await signInThroughPage(doctorPage, served.baseUrl, doctor.email, doctor.password)
    await doctorPage.waitForURL(`${served.baseUrl}/clinic`)
    await doctorPage.getByRole('link', { name: 'Worklist', exact: true }).first().click()
    await doctorPage.waitForURL(`${served.baseUrl}/worklist`)
    await expect.poll(() => doctorPage.getByTestId('worklist-total').textContent()).toMatch(/0 patients/)
    // Set on the page itself: still there later means the page was never reloaded.
    await doctorPage.evaluate(() => ((globalThis as unknown as { flMarker: string }).flMarker = 'not reloaded'))
  })

  it('when the nurse registers the patient and the referral through the pages, then the episode opens', async () => {
    await signInThroughPage(nursePage, served.baseUrl, nurse.email, nurse.password)
    await nursePage.waitForURL(`${served.baseUrl}/screening`)
    await nursePage.getByRole('button', { name: 'Register a patient' }).click()
    await nursePage.waitForURL(`${served.baseUrl}/referrals/new`)

    await nursePage.getByRole('button', { name: 'Register a new patient' }).click()
    await nursePage.fill('#p-mrn', 'BT200001')
    await nursePage.fill('#p-family', FAMILY)
    await nursePage.fill('#p-given', 'Rosalind')
    await nursePage.fill('#p-dob', '1957-04-21')
    await pickOption(nursePage, '#p-sex', 'Female')
    await nursePage.locator('#p-height').pressSequentially('164')
    await nursePage.locator('#p-weight').pressSequentially('71')
    await nursePage.getByRole('button', { name: 'Register patient' }).click()
    await expect.poll(() => nursePage.getByTestId('chosen-patient').textContent()).toContain(FAMILY)

    await pickOption(nursePage, '#r-procedure', new RegExp(OPERATION.replace(/[()]/g, '\\$&')))
    await pickOption(nursePage, '#r-surgeon', SURGEON_NAME)
    // Two weeks away: inside the 28 days in which an anaemic patient is flagged.
    await nursePage.fill('#r-date', addDays(todayIso(), 14))
    await nursePage.getByRole('button', { name: 'Create the referral' }).click()
    await nursePage.waitForURL(/\/referrals\/\d+$/)
    episodeUrl = nursePage.url()
    await expect.poll(() => nursePage.locator('h1').first().textContent()).toContain(FAMILY)
    await expect.poll(() => nursePage.getByTestId('days-to-surgery').textContent()).toContain('in 14 days')
  })

  it('then the doctor’s open worklist shows the new patient without a reload', async () => {
    await expect.poll(() => doctorRow().count(), { timeout: 20_000, interval: 500 }).toBe(1)
    expect(await doctorRow().textContent()).toContain('No screening bloods yet')
  })

  it('when the nurse enters an Hb of 112 g/L, then the episode shows anaemia and the flag', async () => {
    await nursePage.locator('#result-value').pressSequentially('112')
    await nursePage.getByRole('button', { name: 'Save result' }).click()
    await expect.poll(() => nursePage.getByTestId('screening-anaemia').textContent()).toMatch(/Anaemic/)
    await expect.poll(() => nursePage.getByTestId('screening-hb').textContent()).toContain('112 g/L')
    await expect.poll(() => nursePage.locator('header [data-flag="surgery-soon-anaemic"]').count()).toBe(1)
    await expect.poll(() => nursePage.getByTestId('hb-chart').count()).toBe(1)
  })

  it('then, within 20 seconds and without a reload, the doctor’s worklist shows 112 g/L and the flag', async () => {
    await expect
      .poll(async () => (await doctorRow().textContent()) ?? '', { timeout: 20_000, interval: 500 })
      .toContain(FLAG)
    const row = (await doctorRow().textContent()) ?? ''
    expect(row).toContain('112')
    expect(row).not.toContain('No screening bloods yet')
    expect(await doctorPage.evaluate(() => (globalThis as unknown as { flMarker?: string }).flMarker)).toBe('not reloaded')
  })

  it('then the worklist passes axe', async () => {
    expect(await seriousViolations(doctorPage)).toEqual([])
  })

  it('then the episode page passes axe', async () => {
    expect(await seriousViolations(nursePage)).toEqual([])
  })
})

describe('worklist filters live in the address', () => {
  it('when a filtered link is opened, then the filters are restored and applied', async () => {
    await doctorPage.goto(`${served.baseUrl}/worklist?flag=no-screening-result`)
    await expect.poll(() => doctorPage.getByTestId('worklist-total').textContent()).toMatch(/0 patients/)
    await doctorPage.goto(`${served.baseUrl}/worklist?flag=surgery-soon-anaemic&stage=referred`)
    await expect.poll(() => doctorRow().count()).toBe(1)
    expect(await doctorPage.locator('.p-multiselect', { hasText: FLAG }).count()).toBe(1)
  })

  it('when the reader searches, then the search is written into the address', async () => {
    await doctorPage.fill('#wl-q', 'Quill')
    await doctorPage.waitForURL(/q=Quill/)
    expect(new URL(doctorPage.url()).searchParams.get('flag')).toBe('surgery-soon-anaemic')
    await expect.poll(() => doctorRow().count()).toBe(1)
  })
})

describe('moving an episode someone else has just changed', () => {
  it('when the version is stale, then the nurse is told and can try again on the fresh copy', async () => {
    await nursePage.goto(episodeUrl)
    const move = nursePage.locator('[data-move="screened"]')
    await move.waitFor()
    // Another desk moves first: the row's version changes behind this page's back.
    const id = Number(episodeUrl.split('/').pop())
    await Referral.increment('version', { where: { id } })

    await move.click()
    await nursePage.getByTestId('confirm-move').click()
    await expect.poll(() => nursePage.getByTestId('stale-message').count()).toBe(1)

    await move.click()
    await nursePage.getByTestId('confirm-move').click()
    await expect.poll(() => nursePage.getByTestId('timeline').textContent()).toContain('Screening to confirm')
  })
})
