import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, type ServedApp } from '../helpers/browser'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { cleanDatabase } from '../helpers/app'
import { Client } from '../helpers/agent'
import { Maildev } from '../helpers/mail'
import { at, bookingFixture, makeSession, summerDay } from '../helpers/appointmentFactories'
import { drainOutbox } from '../../server/services/outboxWorker'

let served: ServedApp
let browser: Browser
const mail = Maildev.fromEnv()

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await mail.clear()
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

describe('the patient answers from their e-mail', () => {
  it(
    'when a nurse books an infusion and the patient opens the link from the e-mail and confirms, then the page and the staff view ' +
      'show it confirmed',
    async () => {
      const f = await bookingFixture({ givenName: 'Tamsin' })
      await makeSession(summerDay(), '09:00', '12:30', 6)
      const nurse = await new Client(served.app).mustSignIn(f.nurse.email, f.nurse.password)
      const booked = await nurse.post('/api/appointments', {
        referralId: f.referralId,
        kind: 'iron-infusion',
        startsAt: at(summerDay(), '09:30'),
        durationMin: 60,
        location: 'Day Treatment Unit, Level 2',
      })
      expect(booked.status, JSON.stringify(booked.body)).toBe(201)
      await drainOutbox({ sequelize: served.sequelize, config: served.config })
      const [received] = await mail.to(f.email)
      // The link points at PUBLIC_URL; the test server listens on its own port, so keep the path.
      const link = /https?:\/\/[^\s/]+(\/reply\/[A-Za-z0-9_-]{43})/.exec(received!.text)![1]!

      const page = await newTestPage(browser)
      await page.goto(served.baseUrl + link)
      await expect.poll(() => page.getByRole('heading', { level: 1 }).textContent()).toBe('Your appointment')
      const details = page.getByTestId('reply-details')
      await expect.poll(() => details.textContent()).toContain('Iron infusion')
      expect(await details.textContent()).toContain('09:30 to 10:30')
      expect(await page.getByText('Hello Tamsin').count()).toBe(1)
      // No app shell for the patient: no navigation, no sign-out.
      expect(await page.getByRole('navigation').count()).toBe(0)
      expect(await seriousViolations(page)).toEqual([])

      await page.getByRole('button', { name: 'Confirm' }).click()
      await page.getByTestId('reply-confirmed').waitFor()
      const list = (await nurse.get(`/api/referrals/${f.referralId}/appointments`).expect(200)).body.rows
      expect(list[0]).toMatchObject({ status: 'confirmed', statusLabel: 'Confirmed by patient' })
    },
  )

  it('when the link is wrong, then the page says so and tells the patient to call the clinic', async () => {
    const page = await newTestPage(browser)
    await page.goto(`${served.baseUrl}/reply/${'q'.repeat(43)}`)
    const problem = page.getByTestId('reply-problem')
    await problem.waitFor()
    expect(await problem.textContent()).toMatch(/do not recognise this link.*call the Pre-operative Anaemia Service on 01632 960 418/)
    expect(await page.getByRole('heading', { level: 1 }).textContent()).toBe('This link cannot be used')
  })
})
