import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { loadStarterFormulary, makeEpisode } from '../helpers/clinicFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

// Two invented patients: one whose only Hb (138 g/L) is 14 months old, one with ferritin alone
// (indeterminate iron status). Neither may be called ready; the screens must say what is missing.
let served: ServedApp
let browser: Browser
let doctor: StaffFixture
let surgeon: StaffFixture
let oldHbId = 0
let oldHbName = ''
let oldIronId = 0
let noResponseName = ''
let doctorPage: Page
let surgeonPage: Page
const DAY = 86_400_000

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  doctor = await makeStaff('doctor')
  surgeon = await makeStaff('surgeon', { name: 'Ms Perpetua Willowherb' })
  const old = await makeEpisode({
    surgeonId: surgeon.id,
    sex: 'male',
    weightKg: 80,
    heightCm: 178,
    expectedBloodLossMl: 500,
    hb: [{ hbGL: 138, takenAt: new Date(Date.now() - 425 * DAY) }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 20), stage: 'screened', anaemic: false, ironStatus: 'replete' },
  })
  oldHbId = old.referral.id
  oldHbName = old.patient.familyName
  await makeEpisode({
    surgeonId: surgeon.id,
    sex: 'female',
    weightKg: 64,
    heightCm: 165,
    expectedBloodLossMl: 500,
    hb: [{ hbGL: 136 }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 25), stage: 'screened', anaemic: false, ironStatus: 'indeterminate' },
  })
  // Recent Hb 141 g/L, but the only iron studies are 150 days old.
  const oldIron = await makeEpisode({
    surgeonId: surgeon.id,
    sex: 'female',
    weightKg: 62,
    heightCm: 163,
    expectedBloodLossMl: 500,
    hb: [{ hbGL: 141 }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 30), stage: 'screened', anaemic: false, ironStatus: 'replete' },
    iron: { ferritinUgL: 150, tsatPct: 25, takenAt: new Date(Date.now() - 150 * DAY) },
  })
  oldIronId = oldIron.referral.id
  // The response flag as the server keeps it (the rule itself is covered by tests/api/pathway-iron-response.test.ts).
  const noResponse = await makeEpisode({
    surgeonId: surgeon.id,
    sex: 'male',
    weightKg: 75,
    heightCm: 175,
    hb: [{ hbGL: 104 }],
    referral: {
      plannedSurgeryDate: addDays(todayIso(), 18),
      stage: 'recheck',
      anaemic: true,
      ironStatus: 'absolute-deficiency',
      noResponseToIron: true,
    },
  })
  noResponseName = noResponse.patient.familyName
  browser = await launchBrowser()
  doctorPage = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1360, height: 900 } })).newPage()
  surgeonPage = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1360, height: 900 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

describe('a doctor reads why the patient is not yet ready and records the antibody screen', () => {
  it('when the only Hb is 14 months old, then the panel says "Results needed" and asks for a recent Hb', async () => {
    await signInThroughPage(doctorPage, served.baseUrl, doctor.email, doctor.password)
    await doctorPage.waitForURL(`${served.baseUrl}/clinic`)
    await doctorPage.goto(`${served.baseUrl}/referrals/${oldHbId}?tab=readiness`)
    await expect.poll(() => text(doctorPage, 'readiness-verdict')).toContain('Results needed')
    expect(await text(doctorPage, 'readiness-needs')).toMatch(
      /Needs a recent Hb: the latest \(138 g\/L, .*\) is 42\d days old; results count for 90 days/,
    )
    expect(await text(doctorPage, 'readiness-concerns')).toContain('Latest Hb too old')
  })

  it(
    'when the doctor records a positive antibody screen, then the blood order becomes a crossmatch and names the laboratory lead ' + 'time',
    async () => {
      await doctorPage.getByLabel('Positive', { exact: true }).check()
      await expect.poll(() => text(doctorPage, 'blood-order-rule')).toMatch(/Positive red-cell antibody screen: crossmatch is required/)
      expect(await text(doctorPage, 'blood-order')).toMatch(/Crossmatch/)
      expect(await text(doctorPage, 'blood-order-rule')).toMatch(/antigen-negative units/)
      expect(await text(doctorPage, 'readiness-concerns')).toContain('Red-cell antibodies')
      expect((await Referral.findByPk(oldHbId))!.redCellAntibodies).toBe(true)
      await doctorPage.screenshot({ path: '/tmp/readiness-doctor-old-hb.png', fullPage: true })
    },
  )

  it('then the episode page with the evidence and blood plan facts passes axe', async () => {
    expect(await seriousViolations(doctorPage)).toEqual([])
  })
})

describe('a doctor reads that old iron studies do not count, and finds the non-responders', () => {
  it('when the only iron studies are 150 days old, then the panel asks for recent iron studies and shows the concern', async () => {
    await doctorPage.goto(`${served.baseUrl}/referrals/${oldIronId}?tab=readiness`)
    await expect.poll(() => text(doctorPage, 'readiness-verdict')).toContain('Results needed')
    expect(await text(doctorPage, 'readiness-needs')).toMatch(
      new RegExp(
        /Needs recent iron studies: ferritin of \d{4}-\d{2}-\d{2} \(1(49|50|51) days old\), TSAT .*/.source +
          /iron studies count for 90 days \(local policy\)/.source,
      ),
    )
    expect(await text(doctorPage, 'readiness-concerns')).toContain('Iron studies too old')
    await doctorPage.screenshot({ path: '/tmp/readiness-doctor-old-iron.png', fullPage: true })
    expect(await seriousViolations(doctorPage)).toEqual([])
  })

  it('when the doctor filters the worklist by "No response to IV iron", then that patient is listed with the flag', async () => {
    await doctorPage.goto(`${served.baseUrl}/worklist?flag=no-response-to-iron`)
    const row = doctorPage.locator('tr', { hasText: noResponseName })
    await expect.poll(async () => (await row.textContent()) ?? '').toContain('No response to IV iron')
    expect(await doctorPage.locator('tbody tr').count()).toBe(1)
    await doctorPage.screenshot({ path: '/tmp/worklist-no-response.png', fullPage: true })
    expect(await seriousViolations(doctorPage)).toEqual([])
  })
})

describe('the surgeon sees what is missing on the board', () => {
  it('when the surgeon opens the board, then each patient shows "Results needed" with what is missing', async () => {
    await signInThroughPage(surgeonPage, served.baseUrl, surgeon.email, surgeon.password)
    await surgeonPage.waitForURL(`${served.baseUrl}/theatre`)
    await surgeonPage.goto(`${served.baseUrl}/readiness`)
    const row = surgeonPage.locator('tr', { hasText: oldHbName })
    await expect.poll(async () => (await row.textContent()) ?? '').toContain('Results needed')
    expect(await row.textContent()).toContain('Needs a recent Hb')
    expect(await row.textContent()).toContain('Red-cell antibodies')
    expect(await surgeonPage.getByTestId('readiness-row-needs').allTextContents()).toEqual(
      expect.arrayContaining([expect.stringContaining('Needs TSAT or CRP')]),
    )
    await surgeonPage.screenshot({ path: '/tmp/readiness-surgeon-board.png', fullPage: true })
  })

  it('then the board passes axe', async () => {
    expect(await seriousViolations(surgeonPage)).toEqual([])
  })

  it('when the surgeon opens the episode, then the facts are shown read-only and the reasons are in words', async () => {
    await surgeonPage.getByTestId('readiness-patient').filter({ hasText: oldHbName }).click()
    await expect.poll(() => text(surgeonPage, 'readiness-verdict')).toContain('Results needed')
    expect(await text(surgeonPage, 'antibody-screen')).toBe('Positive')
    expect(await text(surgeonPage, 'readiness-reasons')).toMatch(/Blood order decided by/)
    await surgeonPage.screenshot({ path: '/tmp/readiness-surgeon-episode.png', fullPage: true })
    expect(await seriousViolations(surgeonPage)).toEqual([])
  })
})
