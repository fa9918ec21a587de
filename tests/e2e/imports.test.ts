import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makePatient, makeProcedure, makeReferral } from '../helpers/pathwayFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { bundle, csv, HEADER, observation, takenHoursAgo, uploadCsv } from '../helpers/importFixtures'
import { ImportBatch, Referral, Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

let served: ServedApp
let browser: Browser
const T1 = takenHoursAgo(3)

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

let n = 0
/** Each test's own nurse and patient (own MRN and name), on an episode with surgery in 10 days. */
async function importCase(givenName: string, familyName: string) {
  n += 1
  const nurse = await makeStaff('nurse')
  const surgeon = await makeStaff('surgeon')
  const procedureId = (await makeProcedure()).id
  const mrn = `BRW${String(n).padStart(4, '0')}`
  const p = await makePatient({ mrn, givenName, familyName, sex: 'female' })
  // Surgery in 10 days: inside the 28-day "surgery soon" window, so an anaemic Hb raises the flag.
  const referralId = (
    await makeReferral({ patientId: p.id, procedureId, surgeonId: surgeon.id }, { plannedSurgeryDate: addDays(todayIso(), 10) })
  ).id
  return { nurse, mrn, referralId }
}

/** A page signed in as this person, on the import screen. */
async function importPage(who: StaffFixture, home: string): Promise<Page> {
  const page = await newTestPage(browser, { viewport: { width: 1280, height: 900 } })
  await signInThroughPage(page, served.baseUrl, who.email, who.password)
  await page.waitForURL(`${served.baseUrl}${home}`)
  return page
}

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

// Rows 2–3 good (Hb 104 g/L in a woman is anaemic: surgical threshold 130 g/L, clinical reference),
// row 4 an MRN no patient has, row 5 an Hb sent in mg/dL (not an Hb unit).
const mixedFile = (mrn: string) =>
  csv([
    HEADER,
    [mrn, 'HB', 104, 'g/L', T1],
    [mrn, 'FERR', 15, 'ug/L', T1],
    ['BRW9999', 'HB', 120, 'g/L', T1],
    [mrn, 'HB', 120, 'mg/dL', T1],
  ])

describe('a nurse imports a laboratory CSV and a doctor reverses it', () => {
  it(
    'when the nurse opens Import results from the bar, then the screen ' + 'states the 20 MB limit, Commit is off, and it passes axe',
    async () => {
      const nurse = await makeStaff('nurse')
      const page = await importPage(nurse, '/screening')
      await page.locator('[data-nav="import-results"]').click()
      await page.waitForURL(`${served.baseUrl}/imports`)
      // The limit is the server's constant (shared/imports MAX_CSV_BYTES = 20 MiB).
      await expect.poll(() => text(page, 'import-limit')).toMatch(/at most 20 MB/)
      expect(await page.getByTestId('import-commit-button').isDisabled()).toBe(true)
      await page.screenshot({ path: '/tmp/imports-e2e-1-empty-1280.png', fullPage: true })
      await page.setViewportSize({ width: 1024, height: 800 })
      await page.screenshot({ path: '/tmp/imports-e2e-1-empty-1024.png' })
      await page.setViewportSize({ width: 1280, height: 900 })
      expect(await seriousViolations(page)).toEqual([])
      await page.context().close()
    },
  )

  it('when a PDF renamed .csv is previewed, then the server refusal (415) is shown in words and nothing is stored', async () => {
    const nurse = await makeStaff('nurse')
    const page = await importPage(nurse, '/screening')
    await page.goto(`${served.baseUrl}/imports`)
    const batchesBefore = await ImportBatch.count()
    await page.setInputFiles('#import-file', {
      name: 'results.csv',
      mimeType: 'text/csv',
      buffer: Buffer.from('%PDF-1.4\n%âãÏÓ\n1 0 obj <<>> endobj\ntrailer <<>>\n%%EOF\n', 'latin1'),
    })
    await page.getByTestId('import-preview-button').click()
    await expect
      .poll(() => text(page, 'import-refused'))
      .toMatch(/content is application\/pdf.*upload the laboratory export as a CSV text file/)
    expect(await ImportBatch.count()).toBe(batchesBefore)
    await page.context().close()
  })

  it(
    'when the mixed file is previewed and committed, then it counts 2 to store and 2 skipped with reasons, stores nothing until ' +
      'Commit, and the summary links to the worklist showing the flag',
    async () => {
      const { nurse, mrn, referralId } = await importCase('Wenna', 'Tregothnan')
      const page = await importPage(nurse, '/screening')
      await page.goto(`${served.baseUrl}/imports`)
      await page.setInputFiles('#import-file', {
        name: 'lab-export.csv',
        mimeType: 'text/csv',
        buffer: Buffer.from(mixedFile(mrn), 'utf8'),
      })
      await page.getByTestId('import-preview-button').click()
      await expect.poll(() => text(page, 'count-accepted')).toBe('2')
      expect(await text(page, 'count-skipped')).toBe('2')
      expect(await text(page, 'skip-reasons')).toMatch(/Unknown MRN: 1.*Unit not accepted: 1/s)
      const skipped = await text(page, 'skipped-table')
      expect(skipped).toMatch(/4\s*Unknown MRN: no patient has MRN BRW9999/)
      expect(skipped).toMatch(/5\s*Unit not accepted: unit for Haemoglobin must be one of/)
      expect(await text(page, 'accepted-table')).toMatch(new RegExp(`${mrn}.*Wenna Tregothnan.*Haemoglobin.*104 g/L`, 's'))
      expect(await Result.count({ where: { referralId } })).toBe(0)
      expect(await page.getByTestId('import-commit-button').isDisabled()).toBe(false)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '/tmp/imports-e2e-2-preview.png', fullPage: true })

      await page.getByTestId('import-commit-button').click()
      await expect.poll(() => text(page, 'import-stored')).toMatch(/Stored 2 results in batch \d+ for 1 episode; 2 rows skipped/)
      expect(await Result.count({ where: { referralId } })).toBe(2)
      await expect.poll(() => text(page, 'batch-table')).toMatch(/lab-export\.csv.*2 of 4/s)
      await page.screenshot({ path: '/tmp/imports-e2e-3-stored.png', fullPage: true })
      await page.getByTestId('import-worklist-link').click()
      await page.waitForURL(/\/worklist\?flag=surgery-soon-anaemic/)
      const row = page.locator('tbody tr', { hasText: 'Tregothnan, Wenna' })
      await expect.poll(() => row.count()).toBe(1)
      expect(await row.textContent()).toMatch(/Surgery soon, still anaemic/)
      await page.screenshot({ path: '/tmp/imports-e2e-4-worklist.png', fullPage: true })
      await page.context().close()
    },
  )

  it(
    'when a FHIR Bundle has an invalid entry, then each entry has its outcome, nothing can be stored until the user chooses to ' +
      'store the valid ones',
    async () => {
      const { nurse, mrn, referralId } = await importCase('Morwenna', 'Carbethick')
      const page = await importPage(nurse, '/screening')
      await page.goto(`${served.baseUrl}/imports`)
      await page.getByRole('tab', { name: 'FHIR R4 Bundle' }).click()
      // LOINC 718-7 is Hb (issue #7's list); 2345-7 (glucose, from memory) is not one Ferrolane imports.
      const doc = bundle([
        observation({ mrn, loinc: '718-7', value: 125, ucum: 'g/L', at: takenHoursAgo(1) }),
        observation({ mrn, loinc: '2345-7', value: 5, ucum: 'mmol/L' }),
      ])
      await page.setInputFiles('#fhir-file', {
        name: 'bundle.json',
        mimeType: 'application/fhir+json',
        buffer: Buffer.from(JSON.stringify(doc)),
      })
      await page.getByTestId('fhir-preview-button').click()
      await expect.poll(() => text(page, 'fhir-counts')).toMatch(/1 accepted · 0 skipped · 1 invalid/)
      expect(await text(page, 'fhir-entries')).toMatch(/1\s*Invalid\s*LOINC code 2345-7 is not one Ferrolane imports/)
      expect(await text(page, 'fhir-blocked')).toMatch(
        /nothing will be stored from this bundle unless you choose to store the valid entries/,
      )
      expect(await page.getByTestId('fhir-commit-button').isDisabled()).toBe(true)
      await page.getByText('If some entries are invalid, store the valid entries anyway').click()
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '/tmp/imports-e2e-5a-fhir.png', fullPage: true })
      await page.getByTestId('fhir-commit-button').click()
      await expect.poll(() => text(page, 'fhir-stored')).toMatch(/Stored 1 result in batch \d+ for 1 episode/)
      expect(await Result.count({ where: { referralId } })).toBe(1)
      await page.context().close()
    },
  )

  it('when an admin opens the imports page, then only the batch list shows: no upload, no preview of patients, no reversal', async () => {
    const admin = await makeStaff('admin')
    const page = await importPage(admin, '/admin')
    await page.screenshot({ path: '/tmp/security-admin-home.png', fullPage: true })
    await page.goto(`${served.baseUrl}/imports`)
    await page.getByTestId('import-admin-note').waitFor()
    await page.getByTestId('batch-table').waitFor()
    expect(await page.locator('[data-tab="csv"]').count()).toBe(0)
    expect(await page.locator('[data-testid^="reverse-"]').count()).toBe(0)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/security-admin-imports.png', fullPage: true })
    await page.context().close()
  })

  it(
    'when a doctor reverses a CSV batch with a reason, then it is listed as reversed, its results are gone and the episode is ' +
      'screened on what is left',
    async () => {
      const { nurse, mrn, referralId } = await importCase('Demelza', 'Penhallurick')
      const doctor = await makeStaff('doctor')
      // This test's own two batches, sent as the nurse's form sends them: the one to reverse
      // (Hb 104 g/L, ferritin 15) and a later Hb 125 g/L that stays.
      const c = await new Client(served.app).mustSignIn(nurse.email, nurse.password)
      const wrong = await uploadCsv(c, csv([HEADER, [mrn, 'HB', 104, 'g/L', T1], [mrn, 'FERR', 15, 'ug/L', T1]]), {
        commit: true,
        fileName: 'recalled.csv',
      })
      expect(wrong.status, JSON.stringify(wrong.body)).toBe(201)
      const kept = await uploadCsv(c, csv([HEADER, [mrn, 'HB', 125, 'g/L', takenHoursAgo(1)]]), { commit: true, fileName: 'kept.csv' })
      expect(kept.status, JSON.stringify(kept.body)).toBe(201)
      const batchId = Number(wrong.body.batchId)

      const page = await importPage(doctor, '/clinic')
      await page.goto(`${served.baseUrl}/imports`)
      await page.getByTestId(`reverse-${batchId}`).click()
      await page.getByTestId('confirm-batch-reverse').click()
      await expect.poll(() => page.locator('#reverse-reason-error').textContent()).toMatch(/Reason is required/)
      await page.fill('#reverse-reason', 'Laboratory recalled this export: wrong analyser run')
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '/tmp/imports-e2e-5-reverse-dialog.png' })
      await page.getByTestId('confirm-batch-reverse').click()
      await expect.poll(() => text(page, 'batch-table')).toMatch(/Reversed.*Laboratory recalled this export/s)
      await page.getByRole('dialog').waitFor({ state: 'detached' })
      expect(await Result.count({ where: { referralId, importBatchId: batchId } })).toBe(0)
      // Only the Hb 125 g/L is left: still anaemic for surgery in a woman (threshold 130 g/L).
      expect(await Referral.findByPk(referralId, { raw: true })).toMatchObject({ latestHbGL: 125, anaemic: 1 })
      await page.screenshot({ path: '/tmp/imports-e2e-6-reversed.png', fullPage: true })
      await page.setViewportSize({ width: 1024, height: 700 })
      await page.evaluate('window.scrollTo(0, 0)')
      await page.screenshot({ path: '/tmp/imports-e2e-7-doctor-1024.png' })
      await page.context().close()
    },
  )
})
