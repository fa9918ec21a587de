import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, newTestContext, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { Maildev, parseIcs, prop, icsUtc } from '../helpers/mail'
import { at, bookingFixture, makeSession, summerDay } from '../helpers/appointmentFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { drainOutbox } from '../../server/services/outboxWorker'

let served: ServedApp
let browser: Browser
const mail = Maildev.fromEnv()
const DAY = summerDay()
const PLACE = 'Day Treatment Unit, Level 2 (browser test)'

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

describe('a nurse books an infusion, the patient confirms from the e-mail, the worklist follows', () => {
  // One story in one test: each step needs the one before, and nothing is left for another test.
  it(
    'when the nurse books from the episode page and the patient confirms from the e-mail, then the open worklist shows it confirmed ' +
      'without a reload, and the page passes axe',
    async () => {
      const f = await bookingFixture({ givenName: 'Isolde' })
      // The infusion unit's session that day, all four chairs free.
      await makeSession(DAY, '09:00', '12:30', 4, PLACE)
      const nurseContext = await newTestContext(browser)
      const worklistPage = await nurseContext.newPage()
      const episodePage = await nurseContext.newPage()
      const worklistRow = () => worklistPage.locator('tbody tr', { hasText: 'Isolde' })

      // The worklist first: no visit booked yet.
      await signInThroughPage(worklistPage, served.baseUrl, f.nurse.email, f.nurse.password)
      await worklistPage.waitForURL(`${served.baseUrl}/screening`)
      await worklistPage.goto(`${served.baseUrl}/worklist`)
      await expect.poll(() => worklistRow().textContent()).toContain('none booked')
      // Still there at the end means the page was never reloaded.
      await worklistPage.evaluate(() => ((globalThis as unknown as { flMarker: string }).flMarker = 'not reloaded'))

      // The nurse picks a session with free chairs on the episode page and books.
      await episodePage.goto(`${served.baseUrl}/referrals/${f.referralId}`)
      const panel = episodePage.getByTestId('episode-appointments')
      await panel.waitFor()
      await episodePage.fill('#appt-date', DAY)
      const choice = episodePage.getByTestId('session-choice').first()
      await expect.poll(() => choice.textContent()).toContain('4 of 4 chairs free')
      await choice.click()
      expect(await episodePage.inputValue('#appt-time')).toBe('09:00')
      expect(await episodePage.inputValue('#appt-location')).toBe(PLACE)
      await episodePage.fill('#appt-time', '09:30')
      await episodePage.getByTestId('book-appointment').click()
      await expect
        .poll(() => episodePage.getByTestId('booking-saved').textContent())
        .toMatch(/Booked: Iron infusion on .* at 09:30 UK time/)
      await expect.poll(() => panel.getByTestId('appointment-status').first().textContent()).toContain('Booked')

      // The outbox is drained: one e-mail with the time, place, link and a calendar file; staff see it sent.
      await drainOutbox({ sequelize: served.sequelize, config: served.config })
      const received = await mail.to(f.email)
      expect(received).toHaveLength(1)
      const m = received[0]!
      expect(m.subject).toMatch(/^Your hospital appointment is booked: .*09:30$/)
      expect(m.text).toContain('Iron infusion')
      expect(m.text).toContain('09:30 to 10:30, UK time (Europe/London)')
      expect(m.text).toContain(PLACE)
      const cal = parseIcs(await mail.attachment(m, '.ics'))
      expect(cal.events).toHaveLength(1)
      expect(icsUtc(prop(cal.events[0]!, 'DTSTART')!).toISOString()).toBe(at(DAY, '09:30'))
      await expect.poll(() => episodePage.getByTestId('message-status').first().textContent(), { timeout: 15_000 }).toContain('Sent')

      // The patient opens the link in their own browser and confirms.
      // The link points at PUBLIC_URL; the test server listens on its own port, so keep the path.
      const path = /https?:\/\/[^\s/]+(\/reply\/[A-Za-z0-9_-]{43})/.exec(m.text)![1]!
      const patient = await newTestPage(browser)
      await patient.goto(served.baseUrl + path)
      await patient.getByRole('button', { name: 'Confirm' }).click()
      await patient.getByTestId('reply-confirmed').waitFor()
      await expect
        .poll(() => worklistRow().getByTestId('worklist-next-visit').textContent(), { timeout: 20_000, interval: 500 })
        .toMatch(/Iron infusion.*09:30.*Confirmed/s)
      expect(await worklistPage.evaluate(() => (globalThis as unknown as { flMarker?: string }).flMarker)).toBe('not reloaded')

      // The episode page with its appointments panel has no serious accessibility findings.
      await expect
        .poll(() => episodePage.getByTestId('appointment-status').first().textContent(), { timeout: 20_000 })
        .toContain('Confirmed')
      expect(await seriousViolations(episodePage)).toEqual([])
      await nurseContext.close()
    },
  )
})
