import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { readFileSync } from 'node:fs'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { loadStarterFormulary } from '../helpers/clinicFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { fullEpisode, pdfBytes, pdfText, privateUploadDir, storedFiles, textBytes } from '../helpers/documentFixtures'
import { EpisodeDocument } from '../../server/models/index'

const uploadDir = privateUploadDir()
let served: ServedApp
let browser: Browser
let doctor: StaffFixture
let surgeon: StaffFixture

beforeAll(async () => {
  served = await serveBuiltApp({ UPLOAD_DIR: uploadDir })
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  surgeon = await makeStaff('surgeon')
  doctor = await makeStaff('doctor', { name: 'Dr Aurelio Penhallow' })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** Each test's own episode, and the doctor's page open on its Documents and letters tab. */
async function documentsTab(): Promise<{ page: Page; ep: Awaited<ReturnType<typeof fullEpisode>> }> {
  const ep = await fullEpisode(surgeon.id)
  const page = await newTestPage(browser, { acceptDownloads: true })
  await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
  await page.waitForURL(`${served.baseUrl}/clinic`)
  await page.goto(`${served.baseUrl}/referrals/${ep.referral.id}?tab=documents`)
  await expect.poll(() => text(page, 'upload-limits')).toMatch(/PDF, PNG or JPEG only, up to 10 MB/)
  return { page, ep }
}

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

describe('a doctor keeps documents and writes the family-doctor letter', () => {
  it('when the doctor opens the Documents and letters tab, then it states the accepted types and limit, and passes axe', async () => {
    const { page } = await documentsTab()
    expect(await text(page, 'documents-empty')).toMatch(/No documents/)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/docs-e2e-1-empty.png', fullPage: true })
    await page.context().close()
  })

  it('when a text file renamed .pdf is uploaded, then the server refusal is shown and nothing is stored', async () => {
    const { page, ep } = await documentsTab()
    const filesBefore = storedFiles(uploadDir)
    await page.fill('#doc-title', 'Results typed by the practice')
    await page.setInputFiles('#doc-file', { name: 'gp-results.pdf', mimeType: 'application/pdf', buffer: textBytes() })
    await page.getByRole('button', { name: 'Upload document' }).click()
    await expect.poll(() => text(page, 'upload-refused')).toMatch(/plain text, although its name ends in \.pdf; only PDF, PNG or JPEG/)
    expect(await EpisodeDocument.count({ where: { referralId: ep.referral.id } })).toBe(0)
    expect(storedFiles(uploadDir)).toEqual(filesBefore)
    await page.screenshot({ path: '/tmp/docs-e2e-2-refused.png', fullPage: true })
    await page.context().close()
  })

  it('when a real PDF is uploaded, then it is listed with its kind, title, size and who added it', async () => {
    const { page, ep } = await documentsTab()
    const filesBefore = storedFiles(uploadDir).length
    await page.getByText('Referral letter', { exact: true }).click()
    await page.fill('#doc-title', 'Referral from Hollin Lane')
    await page.setInputFiles('#doc-file', {
      name: 'referral.pdf',
      mimeType: 'application/pdf',
      buffer: await pdfBytes('Referral letter (invented)'),
    })
    await page.getByRole('button', { name: 'Upload document' }).click()
    await expect.poll(() => text(page, 'upload-saved')).toMatch(/Added “Referral from Hollin Lane” \(referral\.pdf\)/)
    await expect
      .poll(() => text(page, 'documents-list'))
      .toMatch(/Referral letter.*Referral from Hollin Lane.*referral\.pdf · PDF.*kB.*Dr Aurelio Penhallow/s)
    expect(await EpisodeDocument.count({ where: { referralId: ep.referral.id } })).toBe(1)
    expect(storedFiles(uploadDir)).toHaveLength(filesBefore + 1)
    await page.context().close()
  })

  it('when the doctor writes the letter and downloads it, then the PDF names the patient and the dose given', async () => {
    const { page, ep } = await documentsTab()
    await page.getByTestId('write-letter').click()
    await expect.poll(() => text(page, 'letter-written')).toMatch(/Letter written/)
    await expect.poll(() => text(page, 'documents-list')).toMatch(/Letter from the clinic/)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '/tmp/docs-e2e-3-letter.png', fullPage: true })
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('letter-download').click()])
    expect(download.suggestedFilename()).toMatch(/^family-doctor-letter-.*\.pdf$/)
    // Kept under /tmp so a person can look at the layout (rendered from there for review).
    await download.saveAs('/tmp/docs-e2e-letter.pdf')
    const letter = await pdfText(readFileSync((await download.path())!))
    expect(letter).toContain(`Isolde ${ep.patient.familyName}`)
    expect(letter).toContain(ep.patient.mrn)
    expect(letter).toMatch(/Ferric carboxymaltose \(IV\), 1000 mg/)
    expect(letter).toContain('Dr Aurelio Penhallow')
    await page.context().close()
  })

  it('when the doctor chooses Export as FHIR, then a FHIR JSON Bundle downloads', async () => {
    const { page, ep } = await documentsTab()
    const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('fhir-export').click()])
    expect(download.suggestedFilename()).toBe(`ferrolane-episode-${ep.referral.id}.fhir.json`)
    const bundle = JSON.parse(readFileSync((await download.path())!, 'utf8'))
    expect(bundle).toMatchObject({ resourceType: 'Bundle', type: 'collection' })
    await page.context().close()
  })
})
