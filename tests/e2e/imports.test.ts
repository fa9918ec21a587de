import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { bundle, csv, HEADER, observation, takenHoursAgo } from '../helpers/importFixtures'
import { ImportBatch, Referral, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
let page: Page
let nurse: StaffFixture
let admin: StaffFixture
let referralId: number
const T1 = takenHoursAgo(3)

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  admin = await makeStaff('admin')
  const surgeon = await makeStaff('surgeon')
  const procedureId = (await makeProcedure()).id
  const p = await makePatient({ mrn: 'BRW0001', givenName: 'Wenna', familyName: 'Tregothnan', sex: 'female' })
  // Surgery in 10 days: inside the 28-day "surgery soon" window, so an anaemic Hb raises the flag.
  referralId = (await makeReferral({ patientId: p.id, procedureId, surgeonId: surgeon.id }, { plannedSurgeryDate: addDays(todayIso(), 10) })).id
  browser = await launchBrowser()
  page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 900 } })).newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const text = async (testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

// Rows 2–3 good (Hb 104 g/L in a woman is anaemic: surgical threshold 130 g/L, clinical reference),
// row 4 an MRN no patient has, row 5 an Hb sent in mg/dL (not an Hb unit).
const FILE = csv([
  HEADER,
  ['BRW0001', 'HB', 104, 'g/L', T1],
  ['BRW0001', 'FERR', 15, 'ug/L', T1],
  ['BRW9999', 'HB', 120, 'g/L', T1],
  ['BRW0001', 'HB', 120, 'mg/dL', T1],
])

describe('a nurse imports a laboratory CSV and a doctor reverses it', () => {
  it('when the nurse opens Import results from the bar, then the screen states the 20 MB limit, Commit is off, and it passes axe', async () => {
    await signInThroughPage(page, served.baseUrl, nurse.email, nurse.password)
    await page.waitForURL(`${served.baseUrl}/screening`)
    await page.locator('[data-nav="import-results"]').click()
    await page.waitForURL(`${served.baseUrl}/imports`)
    // The limit is the server's constant (shared/imports MAX_CSV_BYTES = 20 MiB).
    await expect.poll(() => text('import-limit')).toMatch(/at most 20 MB/)
    expect(await page.getByTestId('import-commit-button').isDisabled()).toBe(true)
    await page.screenshot({ path: '/tmp/imports-e2e-1-empty-1280.png', fullPage: true })
    await page.setViewportSize({ width: 1024, height: 800 })
    await page.screenshot({ path: '/tmp/imports-e2e-1-empty-1024.png' })
    await page.setViewportSize({ width: 1280, height: 900 })
    expect(await seriousViolations(page)).toEqual([])
  })

  it('when a PDF renamed .csv is previewed, then the server refusal (415) is shown in words and nothing is stored', async () => {
    await page.setInputFiles('#import-file', { name: 'results.csv', mimeType: 'text/csv', buffer: Buffer.from('%PDF-1.4\n%âãÏÓ\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n', 'latin1') })
    await page.getByTestId('import-preview-button').click()
    await expect.poll(() => text('import-refused')).toMatch(/content is application\/pdf.*upload the laboratory export as a CSV text file/)
    expect(await ImportBatch.count()).toBe(0)
  })

  it('when the mixed file is previewed, then it counts 2 to store and 2 skipped, each with its reason, and stores nothing', async () => {
    await page.setInputFiles('#import-file', { name: 'lab-export.csv', mimeType: 'text/csv', buffer: Buffer.from(FILE, 'utf8') })
    await page.getByTestId('import-preview-button').click()
    await expect.poll(() => text('count-accepted')).toBe('2')
    expect(await text('count-skipped')).toBe('2')
    expect(await text('skip-reasons')).toMatch(/Unknown MRN: 1.*Unit not accepted: 1/s)
    const skipped = await text('skipped-table')
    expect(skipped).toMatch(/4\s*Unknown MRN: no patient has MRN BRW9999/)
    expect(skipped).toMatch(/5\s*Unit not accepted: unit for Haemoglobin must be one of/)
    expect(await text('accepted-table')).toMatch(/BRW0001.*Wenna Tregothnan.*Haemoglobin.*104 g\/L/s)
    expect(await Result.count()).toBe(0)
    expect(await page.getByTestId('import-commit-button').isDisabled()).toBe(false)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/imports-e2e-2-preview.png', fullPage: true })
  })

  it('when the nurse commits, then the summary links to the worklist, which shows the patient flagged surgery soon, still anaemic', async () => {
    await page.getByTestId('import-commit-button').click()
    await expect.poll(() => text('import-stored')).toMatch(/Stored 2 results in batch \d+ for 1 episode; 2 rows skipped/)
    expect(await Result.count({ where: { referralId } })).toBe(2)
    await expect.poll(() => text('batch-table')).toMatch(/lab-export\.csv.*2 of 4/s)
    await page.screenshot({ path: '/tmp/imports-e2e-3-stored.png', fullPage: true })
    await page.getByTestId('import-worklist-link').click()
    await page.waitForURL(/\/worklist\?flag=surgery-soon-anaemic/)
    await expect.poll(() => text('worklist-patient')).toMatch(/Tregothnan, Wenna/)
    expect(await page.locator('main').textContent()).toMatch(/Surgery soon, still anaemic/)
    await page.screenshot({ path: '/tmp/imports-e2e-4-worklist.png', fullPage: true })
  })

  it('when a FHIR Bundle has an invalid entry, then each entry has its outcome, nothing can be stored until the user chooses to store the valid ones', async () => {
    await page.goto(`${served.baseUrl}/imports`)
    await page.getByRole('tab', { name: 'FHIR R4 Bundle' }).click()
    // LOINC 718-7 is Hb (issue #7's list); 2345-7 (glucose, from memory) is not one Ferrolane imports.
    const doc = bundle([observation({ mrn: 'BRW0001', loinc: '718-7', value: 125, ucum: 'g/L', at: takenHoursAgo(1) }), observation({ mrn: 'BRW0001', loinc: '2345-7', value: 5, ucum: 'mmol/L' })])
    await page.setInputFiles('#fhir-file', { name: 'bundle.json', mimeType: 'application/fhir+json', buffer: Buffer.from(JSON.stringify(doc)) })
    await page.getByTestId('fhir-preview-button').click()
    await expect.poll(() => text('fhir-counts')).toMatch(/1 accepted · 0 skipped · 1 invalid/)
    expect(await text('fhir-entries')).toMatch(/1\s*Invalid\s*LOINC code 2345-7 is not one Ferrolane imports/)
    expect(await text('fhir-blocked')).toMatch(/nothing will be stored from this bundle unless you choose to store the valid entries/)
    expect(await page.getByTestId('fhir-commit-button').isDisabled()).toBe(true)
    await page.getByText('If some entries are invalid, store the valid entries anyway').click()
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/imports-e2e-5a-fhir.png', fullPage: true })
    await page.getByTestId('fhir-commit-button').click()
    await expect.poll(() => text('fhir-stored')).toMatch(/Stored 1 results in batch \d+ for 1 episode/)
    expect(await Result.count({ where: { referralId } })).toBe(3)
  })

  it('when an admin opens the imports page, then only the batch list shows: no upload, no preview of patients, no reversal', async () => {
    await page.context().clearCookies()
    await signInThroughPage(page, served.baseUrl, admin.email, admin.password)
    await page.waitForURL(`${served.baseUrl}/admin`)
    await page.screenshot({ path: '/tmp/security-admin-home.png', fullPage: true })
    await page.goto(`${served.baseUrl}/imports`)
    await page.getByTestId('import-admin-note').waitFor()
    await page.getByTestId('batch-table').waitFor()
    expect(await page.locator('[data-tab="csv"]').count()).toBe(0)
    expect(await page.locator('[data-testid^="reverse-"]').count()).toBe(0)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/security-admin-imports.png', fullPage: true })
  })

  it('when a doctor reverses the CSV batch with a reason, then it is listed as reversed, its results are gone and the episode is screened on what is left', async () => {
    await page.context().clearCookies()
    const doctor = await makeStaff('doctor')
    await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
    await page.goto(`${served.baseUrl}/imports`)
    const batch = (await ImportBatch.findOne({ where: { kind: 'lab-csv' }, raw: true }))!
    await page.getByTestId(`reverse-${batch.id}`).click()
    await page.getByTestId('confirm-batch-reverse').click()
    await expect.poll(() => page.locator('#reverse-reason-error').textContent()).toMatch(/Reason is required/)
    await page.fill('#reverse-reason', 'Laboratory recalled this export: wrong analyser run')
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/imports-e2e-5-reverse-dialog.png' })
    await page.getByTestId('confirm-batch-reverse').click()
    await expect.poll(() => text('batch-table')).toMatch(/Reversed.*Laboratory recalled this export/s)
    await page.getByRole('dialog').waitFor({ state: 'detached' })
    expect(await Result.count({ where: { referralId, importBatchId: batch.id } })).toBe(0)
    // Only the FHIR Hb 125 g/L is left: still anaemic for surgery in a woman (threshold 130 g/L).
    expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: 125, anaemic: 1 })
    await page.screenshot({ path: '/tmp/imports-e2e-6-reversed.png', fullPage: true })
    await page.setViewportSize({ width: 1024, height: 700 })
    await page.evaluate('window.scrollTo(0, 0)')
    await page.screenshot({ path: '/tmp/imports-e2e-7-doctor-1024.png' })
  })
})
