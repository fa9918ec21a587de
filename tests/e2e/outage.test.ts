import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { Result } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

/*
 * How the client reacts when the server answers 503 `unavailable` (issue #12: the server does so
 * while MariaDB is down). The 503 is made with page.route, because what is tested here is the
 * client's reaction only; the server's own 503 is tested against a real outage on the server side.
 */
let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let surgeon: StaffFixture

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  surgeon = await makeStaff('surgeon')
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const UNAVAILABLE = {
  status: 503,
  headers: { 'Retry-After': '1' },
  contentType: 'application/json',
  body: JSON.stringify({ error: { code: 'unavailable', message: 'The database cannot be reached just now; try again in a moment.' } }),
}

async function nursePage(): Promise<Page> {
  const page = await newTestPage(browser)
  await signInThroughPage(page, served.baseUrl, nurse.email, nurse.password)
  await page.waitForURL(`${served.baseUrl}/screening`)
  return page
}

describe('the database is unreachable for a moment', () => {
  it(
    'when saving an Hb answers 503 unavailable, then an alert says the change was not saved, nothing is stored, and the next save ' +
      'clears it',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        hb: [],
        iron: null,
        referral: { stage: 'referred', plannedSurgeryDate: addDays(todayIso(), 30) },
      })
      const page = await nursePage()
      await page.goto(`${served.baseUrl}/referrals/${referral.id}`)
      let refused = 0
      await page.route(`**/api/referrals/${referral.id}/results`, async (route) => {
        if (route.request().method() === 'POST' && refused === 0) {
          refused += 1
          return route.fulfill(UNAVAILABLE)
        }
        return route.continue()
      })
      await page.locator('#result-value').pressSequentially('112')
      await page.getByRole('button', { name: 'Save result' }).click()
      const alert = page.getByRole('alert').filter({ hasText: 'Ferrolane cannot reach its database; your last change was not saved' })
      await alert.waitFor()
      expect(refused).toBe(1)
      expect(await Result.count({ where: { referralId: referral.id } })).toBe(0)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '/tmp/outage-unsaved-alert.png', fullPage: true })

      // The database is back: the same save goes through and the alert goes away.
      await page.getByRole('button', { name: 'Save result' }).click()
      await expect.poll(() => page.getByTestId('screening-hb').textContent()).toContain('112 g/L')
      await alert.waitFor({ state: 'detached' })
      expect(await Result.count({ where: { referralId: referral.id } })).toBe(1)
      await page.context().close()
    },
  )

  it('when the worklist read answers 503 twice, then the page retries by itself, honouring Retry-After, and shows the list', async () => {
    const { patient } = await makeEpisode({
      surgeonId: surgeon.id,
      referral: { stage: 'referred', plannedSurgeryDate: addDays(todayIso(), 30) },
    })
    const page = await nursePage()
    const answered: number[] = []
    await page.route('**/api/worklist**', async (route) => {
      if (answered.filter((s) => s === 503).length < 2) {
        answered.push(503)
        return route.fulfill(UNAVAILABLE)
      }
      answered.push(200)
      return route.continue()
    })
    await page.goto(`${served.baseUrl}/worklist`)
    await expect.poll(() => page.locator('tbody tr', { hasText: patient.familyName }).count(), { timeout: 20_000 }).toBe(1)
    expect(answered.slice(0, 3)).toEqual([503, 503, 200])
    // A read that recovers on its own never raises the "change not saved" alert.
    expect(await page.getByTestId('unsaved-alert').count()).toBe(0)
    await page.context().close()
  })
})
