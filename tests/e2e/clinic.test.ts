import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { loadStarterFormulary, makeEpisode } from '../helpers/clinicFactories'
import { pickOption, seriousViolations } from '../helpers/pathwayBrowser'
import { answerCautionsNo, retype } from '../helpers/clinicBrowser'
import { Prescription, ReadinessReview } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'
import { VERDICT_LABELS } from '../../shared/clinic/readiness'

let served: ServedApp
let browser: Browser
let doctor: StaffFixture
let surgeon: StaffFixture
let referralId = 0
let familyName = ''
let doctorPage: Page
let surgeonPage: Page

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  doctor = await makeStaff('doctor')
  surgeon = await makeStaff('surgeon', { name: 'Mr Osric Tallowmere' })
  // Iron deficient, 45 kg, Hb 90 g/L, a routine operation in three weeks.
  const { patient, referral } = await makeEpisode({
    surgeonId: surgeon.id, weightKg: 45, heightCm: 158, hb: [{ hbGL: 90 }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 21), stage: 'clinic' },
  })
  referralId = referral.id
  familyName = patient.familyName
  browser = await launchBrowser()
  doctorPage = await (await browser.newContext({ locale: 'en-GB' })).newPage()
  surgeonPage = await (await browser.newContext({ locale: 'en-GB' })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

describe('a doctor prescribes IV iron from the live dose plan', () => {
  it('when the doctor picks ferric derisomaltose, then the plan shows the Ganzoni deficit and the capped doses', async () => {
    await signInThroughPage(doctorPage, served.baseUrl, doctor.email, doctor.password)
    await doctorPage.waitForURL(`${served.baseUrl}/clinic`)
    await doctorPage.goto(`${served.baseUrl}/referrals/${referralId}?tab=clinic`)
    await pickOption(doctorPage, '#rx-product', 'Ferric derisomaltose (IV)')
    // Ganzoni (clinical reference §6): 45 × (150 − 90) × 0.24 + 500 = 1148 mg; rounded to 100 mg vials, 1100 mg.
    await expect.poll(() => text(doctorPage, 'dose-deficit')).toMatch(/1148\s*mg/)
    expect(await text(doctorPage, 'dose-total')).toMatch(/1100\s*mg/)
    expect(await text(doctorPage, 'dose-method')).toMatch(/Ganzoni/)
    // Formulary: ≤ 20 mg/kg a dose → 900 mg at 45 kg, then the remaining 200 mg a week later.
    expect(await doctorPage.inputValue('#dose-mg-1')).toBe('900')
    expect(await doctorPage.inputValue('#dose-mg-2')).toBe('200')
    expect(await text(doctorPage, 'dose-schedule')).toMatch(/mg per kg limit/)
    expect(await text(doctorPage, 'decision-support')).toMatch(/prescribing information/)
  })

  it('when the checklist is not answered, then nothing is saved and each question asks for an answer', async () => {
    await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
    await expect.poll(() => text(doctorPage, 'caution-checklist')).toMatch(/Answer this question/)
    expect(await Prescription.count()).toBe(0)
  })

  it('when a dose is raised over 20 mg/kg, then the server refuses inline naming the cap', async () => {
    await answerCautionsNo(doctorPage)
    await retype(doctorPage, '#dose-mg-1', '1000')
    await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
    await expect.poll(() => text(doctorPage, 'prescription-refused')).toMatch(/20 mg\/kg/)
    expect(await Prescription.count()).toBe(0)
  })

  it('when the planned doses are kept and saved, then the prescription is stored as shown', async () => {
    await retype(doctorPage, '#dose-mg-1', '900')
    await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
    await expect.poll(() => text(doctorPage, 'prescription-saved')).toMatch(/1100 mg/)
    const stored = await Prescription.findOne({ where: { referralId } })
    expect(stored?.plan.doses.map((d) => d.doseMg)).toEqual([900, 200])
  })

  it('then the clinic tab passes axe', async () => {
    expect(await seriousViolations(doctorPage)).toEqual([])
  })
})

describe('the surgeon sees the patient on the readiness board and acknowledges the plan', () => {
  // Hb 90 g/L on the day, routine operation, below 100 g/L: the verdict prompts deferral.
  const verdict = VERDICT_LABELS['consider-deferral']

  it('when the surgeon signs in, then the board lists the patient with the verdict', async () => {
    await signInThroughPage(surgeonPage, served.baseUrl, surgeon.email, surgeon.password)
    await surgeonPage.waitForURL(`${served.baseUrl}/theatre`)
    expect(await surgeonPage.locator('h1').first().textContent()).toContain('Theatre readiness')
    const row = surgeonPage.locator('tbody tr', { hasText: familyName })
    await expect.poll(() => row.count()).toBe(1)
    expect(await row.textContent()).toContain(verdict)
    expect(await row.textContent()).toContain('90')
  })

  it('then the readiness board passes axe', async () => {
    expect(await seriousViolations(surgeonPage)).toEqual([])
  })

  it('when the surgeon opens the episode, then the readiness panel shows the figures, methods and charts', async () => {
    await surgeonPage.getByTestId('readiness-patient').filter({ hasText: familyName }).click()
    await surgeonPage.waitForURL(new RegExp(`/referrals/${referralId}\\?tab=readiness`))
    await expect.poll(() => text(surgeonPage, 'readiness-verdict')).toContain(verdict)
    expect(await text(surgeonPage, 'predicted-hb')).toMatch(/90 g\/L/)
    expect(await text(surgeonPage, 'readiness-figures')).toMatch(/Nadler/)
    expect(await text(surgeonPage, 'readiness-assumptions')).toMatch(/Decision support/)
    expect(await surgeonPage.getByTestId('projection-chart').count()).toBe(1)
    expect(await surgeonPage.getByTestId('oxygen-chart').count()).toBe(1)
  })

  it('when the surgeon acknowledges the plan, then the stored acknowledgement shows with what they saw', async () => {
    await surgeonPage.getByTestId('acknowledge-plan').click()
    await expect.poll(() => text(surgeonPage, 'last-readiness-review')).toMatch(/Plan acknowledged by Mr Osric Tallowmere/)
    expect(await text(surgeonPage, 'last-readiness-review')).toContain(verdict)
    const stored = await ReadinessReview.findAll({ where: { referralId } })
    expect(stored.map((r) => r.action)).toEqual(['acknowledged'])
  })

  it('then the episode page with the readiness panel open passes axe', async () => {
    expect(await seriousViolations(surgeonPage)).toEqual([])
  })
})
