import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestContext, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeProcedure } from '../helpers/pathwayFactories'
import { makeEpisode } from '../helpers/clinicFactories'
import { pickOption, seriousViolations } from '../helpers/pathwayBrowser'
import { Patient, Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let doctor: StaffFixture
let surgeon: StaffFixture
const SURGEON_NAME = 'Ms Imelda Brackenridge'
const OPERATION = 'Knee replacement (browser test)'
const FLAG = 'Surgery soon, still anaemic'

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  doctor = await makeStaff('doctor')
  surgeon = await makeStaff('surgeon', { name: SURGEON_NAME })
  await makeProcedure({ code: 'TKRB', name: OPERATION, expectedBloodLossMl: 500 })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** A page in its own session, signed in, on the person's home. */
async function signedIn(who: StaffFixture, home: string): Promise<Page> {
  const page = await (await newTestContext(browser)).newPage()
  await signInThroughPage(page, served.baseUrl, who.email, who.password)
  await page.waitForURL(`${served.baseUrl}${home}`)
  return page
}

/** This test's own referred episode: Hb 112 g/L in a woman (anaemic), surgery in 14 days, so flagged. */
async function flaggedEpisode(familyName: string) {
  const ep = await makeEpisode({
    surgeonId: surgeon.id,
    hb: [{ hbGL: 112 }],
    referral: { stage: 'referred', plannedSurgeryDate: addDays(todayIso(), 14) },
  })
  await Patient.update({ familyName, givenName: 'Rosalind' }, { where: { id: ep.patient.id } })
  return ep
}

describe('a nurse registers a patient and enters a low Hb; a colleague sees it live', () => {
  // One story in one test: each step needs the one before (the same patient, the same open pages).
  it(
    'when the nurse registers a patient and enters an Hb of 112 g/L, then the doctor’s open worklist shows the patient, then the ' +
      'value and the flag, without a reload, and both pages pass axe',
    async () => {
      const FAMILY = 'Quillbarrow'
      const doctorRow = () => doctorPage.locator('tbody tr', { hasText: FAMILY })

      // The doctor opens the worklist first: no such patient yet.
      const doctorPage = await signedIn(doctor, '/clinic')
      await doctorPage.getByRole('link', { name: 'Worklist', exact: true }).first().click()
      await doctorPage.waitForURL(`${served.baseUrl}/worklist`)
      await expect.poll(() => doctorPage.getByTestId('worklist-total').textContent()).toMatch(/\d+ patients?/)
      expect(await doctorRow().count()).toBe(0)
      // Set on the page itself: still there later means the page was never reloaded.
      await doctorPage.evaluate(() => ((globalThis as unknown as { flMarker: string }).flMarker = 'not reloaded'))

      // The nurse registers the patient and the referral through the pages; the episode opens.
      const nursePage = await signedIn(nurse, '/screening')
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
      await expect.poll(() => nursePage.locator('h1').first().textContent()).toContain(FAMILY)
      await expect.poll(() => nursePage.getByTestId('days-to-surgery').textContent()).toContain('in 14 days')

      // The doctor's open worklist shows the new patient without a reload.
      await expect.poll(() => doctorRow().count(), { timeout: 20_000, interval: 500 }).toBe(1)
      expect(await doctorRow().textContent()).toContain('No screening bloods yet')

      // The nurse enters an Hb of 112 g/L: the episode shows anaemia and the flag.
      await nursePage.locator('#result-value').pressSequentially('112')
      await nursePage.getByRole('button', { name: 'Save result' }).click()
      await expect.poll(() => nursePage.getByTestId('screening-anaemia').textContent()).toMatch(/Anaemic/)
      await expect.poll(() => nursePage.getByTestId('screening-hb').textContent()).toContain('112 g/L')
      await expect.poll(() => nursePage.locator('header [data-flag="surgery-soon-anaemic"]').count()).toBe(1)
      await expect.poll(() => nursePage.getByTestId('hb-chart').count()).toBe(1)

      // Within 20 seconds and without a reload, the doctor's worklist shows 112 g/L and the flag.
      await expect.poll(async () => (await doctorRow().textContent()) ?? '', { timeout: 20_000, interval: 500 }).toContain(FLAG)
      const row = (await doctorRow().textContent()) ?? ''
      expect(row).toContain('112')
      expect(row).not.toContain('No screening bloods yet')
      expect(await doctorPage.evaluate(() => (globalThis as unknown as { flMarker?: string }).flMarker)).toBe('not reloaded')

      expect(await seriousViolations(doctorPage)).toEqual([])
      expect(await seriousViolations(nursePage)).toEqual([])
      await doctorPage.context().close()
      await nursePage.context().close()
    },
  )
})

describe('worklist filters live in the address', () => {
  it(
    'when a filtered link is opened and the reader searches, then the filters are restored, applied, and the search is written into ' +
      'the address',
    async () => {
      const FAMILY = 'Tresidder'
      await flaggedEpisode(FAMILY)
      const doctorPage = await signedIn(doctor, '/clinic')
      const doctorRow = () => doctorPage.locator('tbody tr', { hasText: FAMILY })
      await doctorPage.goto(`${served.baseUrl}/worklist?flag=no-screening-result`)
      await expect.poll(() => doctorPage.getByTestId('worklist-total').textContent()).toMatch(/\d+ patients?/)
      expect(await doctorRow().count()).toBe(0)
      await doctorPage.goto(`${served.baseUrl}/worklist?flag=surgery-soon-anaemic&stage=referred`)
      await expect.poll(() => doctorPage.getByTestId('worklist-total').textContent()).toMatch(/\d+ patients?/)
      await expect.poll(() => doctorRow().count()).toBe(1)
      expect(await doctorPage.locator('.p-multiselect', { hasText: FLAG }).count()).toBe(1)

      await doctorPage.fill('#wl-q', 'Tresid')
      await doctorPage.waitForURL(/q=Tresid/)
      expect(new URL(doctorPage.url()).searchParams.get('flag')).toBe('surgery-soon-anaemic')
      await expect.poll(() => doctorRow().count()).toBe(1)
      await expect.poll(() => doctorPage.locator('tbody tr').count()).toBe(1)
      await doctorPage.context().close()
    },
  )
})

describe('moving an episode someone else has just changed', () => {
  it('when the version is stale, then the nurse is told and can try again on the fresh copy', async () => {
    const { referral } = await flaggedEpisode('Pendarves')
    const nursePage = await signedIn(nurse, '/screening')
    await nursePage.goto(`${served.baseUrl}/referrals/${referral.id}`)
    const move = nursePage.locator('[data-move="screened"]')
    await move.waitFor()
    // Another desk moves first: the row's version changes behind this page's back.
    await Referral.increment('version', { where: { id: referral.id } })

    await move.click()
    await nursePage.getByTestId('confirm-move').click()
    await expect.poll(() => nursePage.getByTestId('stale-message').count()).toBe(1)

    await move.click()
    await nursePage.getByTestId('confirm-move').click()
    await expect.poll(() => nursePage.getByTestId('timeline').textContent()).toContain('Screening to confirm')
    await nursePage.context().close()
  })
})
