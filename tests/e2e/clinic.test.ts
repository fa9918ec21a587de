import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
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

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  doctor = await makeStaff('doctor')
  surgeon = await makeStaff('surgeon', { name: 'Mr Osric Tallowmere' })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** Each test's own episode: iron deficient, 45 kg, Hb 90 g/L, a routine operation in three weeks. */
async function ironDeficientEpisode() {
  return makeEpisode({
    surgeonId: surgeon.id,
    weightKg: 45,
    heightCm: 158,
    hb: [{ hbGL: 90 }],
    referral: { plannedSurgeryDate: addDays(todayIso(), 21), stage: 'clinic' },
  })
}

async function signedIn(who: StaffFixture, home: string): Promise<Page> {
  const page = await newTestPage(browser)
  await signInThroughPage(page, served.baseUrl, who.email, who.password)
  await page.waitForURL(`${served.baseUrl}${home}`)
  return page
}

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

describe('a doctor prescribes IV iron from the live dose plan', () => {
  // One story in one test: each step works on the form the step before left filled in.
  it(
    'when the doctor picks ferric derisomaltose, answers the checklist and keeps the capped doses, then the plan shows Ganzoni, the ' +
      'server refuses an over-cap dose, stores the kept plan, and the tab passes axe',
    async () => {
      const { referral } = await ironDeficientEpisode()
      const referralId = referral.id
      const doctorPage = await signedIn(doctor, '/clinic')
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

      // The checklist not answered: nothing is saved and each question asks for an answer.
      await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
      await expect.poll(() => text(doctorPage, 'caution-checklist')).toMatch(/Answer this question/)
      expect(await Prescription.count({ where: { referralId } })).toBe(0)

      // A dose raised over 20 mg/kg: the server refuses inline, naming the cap.
      await answerCautionsNo(doctorPage)
      await retype(doctorPage, '#dose-mg-1', '1000')
      await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
      await expect.poll(() => text(doctorPage, 'prescription-refused')).toMatch(/20 mg\/kg/)
      expect(await Prescription.count({ where: { referralId } })).toBe(0)

      // The planned doses kept and saved: the prescription is stored as shown.
      await retype(doctorPage, '#dose-mg-1', '900')
      await doctorPage.getByRole('button', { name: 'Save prescription' }).click()
      await expect.poll(() => text(doctorPage, 'prescription-saved')).toMatch(/1100 mg/)
      const stored = await Prescription.findOne({ where: { referralId } })
      expect(stored?.plan.doses.map((d) => d.doseMg)).toEqual([900, 200])

      expect(await seriousViolations(doctorPage)).toEqual([])
      await doctorPage.context().close()
    },
  )
})

describe('the surgeon sees the patient on the readiness board and acknowledges the plan', () => {
  // Hb 90 g/L on the day, routine operation, below 100 g/L: the verdict prompts deferral.
  const verdict = VERDICT_LABELS['consider-deferral']

  it(
    'when the surgeon signs in, opens the patient from the board and acknowledges the plan, then the board, the readiness panel and ' +
      'the stored acknowledgement show the verdict, and both pages pass axe',
    async () => {
      const { patient, referral } = await ironDeficientEpisode()
      const referralId = referral.id
      const familyName = patient.familyName
      const surgeonPage = await signedIn(surgeon, '/theatre')

      // The board lists the patient with the verdict.
      expect(await surgeonPage.locator('h1').first().textContent()).toContain('Theatre readiness')
      const row = surgeonPage.locator('tbody tr', { hasText: familyName })
      await expect.poll(() => row.count()).toBe(1)
      expect(await row.textContent()).toContain(verdict)
      expect(await row.textContent()).toContain('90')
      expect(await seriousViolations(surgeonPage)).toEqual([])

      // The episode's readiness panel shows the figures, methods and charts.
      await surgeonPage.getByTestId('readiness-patient').filter({ hasText: familyName }).click()
      await surgeonPage.waitForURL(new RegExp(`/referrals/${referralId}\\?tab=readiness`))
      await expect.poll(() => text(surgeonPage, 'readiness-verdict')).toContain(verdict)
      expect(await text(surgeonPage, 'predicted-hb')).toMatch(/90 g\/L/)
      expect(await text(surgeonPage, 'readiness-figures')).toMatch(/Nadler/)
      expect(await text(surgeonPage, 'readiness-assumptions')).toMatch(/Decision support/)
      expect(await surgeonPage.getByTestId('projection-chart').count()).toBe(1)
      expect(await surgeonPage.getByTestId('oxygen-chart').count()).toBe(1)

      // The acknowledgement is stored with what the surgeon saw.
      await surgeonPage.getByTestId('acknowledge-plan').click()
      await expect.poll(() => text(surgeonPage, 'last-readiness-review')).toMatch(/Plan acknowledged by Mr Osric Tallowmere/)
      expect(await text(surgeonPage, 'last-readiness-review')).toContain(verdict)
      const stored = await ReadinessReview.findAll({ where: { referralId } })
      expect(stored.map((r) => r.action)).toEqual(['acknowledged'])
      expect(await seriousViolations(surgeonPage)).toEqual([])
      await surgeonPage.context().close()
    },
  )
})
