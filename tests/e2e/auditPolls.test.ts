import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { AuditEntry } from '../../server/models/index'

// Issue #12, point 7: an open episode tab polls; the audit keeps one entry per open, not per poll.
let served: ServedApp
let browser: Browser
let page: Page
let nurse: StaffFixture
let referralId: number
const episodeReads: { refetch: boolean }[] = []

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  const surgeon = await makeStaff('surgeon')
  nurse = await makeStaff('nurse')
  referralId = (await makeEpisode({ surgeonId: surgeon.id })).referral.id
  browser = await launchBrowser()
  page = await (await browser.newContext({ locale: 'en-GB' })).newPage()
  page.on('request', (r) => {
    // The episode is opened by its own route and then polled with its appointments and messages.
    if ([`/api/referrals/${referralId}`, `/api/referrals/${referralId}/updates`].includes(new URL(r.url()).pathname))
      episodeReads.push({ refetch: r.headers()['x-ferrolane-refetch'] === '1' })
  })
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const views = (entity: string) => AuditEntry.count({ where: { action: 'view', entity, userId: nurse.id } })

describe('a nurse keeps an episode open while it polls', () => {
  it('when the episode page stays open past a poll, then the open is audited once and the polls are marked as refetches', async () => {
    await signInThroughPage(page, served.baseUrl, nurse.email, nurse.password)
    await page.waitForURL((url) => !url.pathname.startsWith('/sign-in'))
    await page.goto(`${served.baseUrl}/referrals/${referralId}`)
    await expect.poll(() => episodeReads.length, { timeout: 40_000, interval: 1000 }).toBeGreaterThanOrEqual(2)
    expect(episodeReads[0]).toEqual({ refetch: false })
    expect(episodeReads.slice(1).every((r) => r.refetch)).toBe(true)
    expect(await views('referral')).toBe(1)
  }, 60_000)

  it('when the nurse opens the episode again, then that open is audited too', async () => {
    await page.goto(`${served.baseUrl}/worklist`)
    await page.goto(`${served.baseUrl}/referrals/${referralId}`)
    await expect.poll(() => views('referral'), { timeout: 15_000 }).toBe(2)
  })
})
