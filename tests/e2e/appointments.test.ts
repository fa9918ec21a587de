import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, BrowserContext, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { Maildev, parseIcs, prop, icsUtc } from '../helpers/mail'
import { at, bookingFixture, makeSession, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { drainOutbox } from '../../server/services/outboxWorker'

let served: ServedApp
let browser: Browser
let f: BookingFixture
let nurseContext: BrowserContext
let worklistPage: Page
let episodePage: Page
const mail = Maildev.fromEnv()
const DAY = summerDay()
const PLACE = 'Day Treatment Unit, Level 2 (browser test)'

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await mail.clear()
  f = await bookingFixture({ givenName: 'Isolde' })
  // The infusion unit's session that day, all four chairs free.
  await makeSession(DAY, '09:00', '12:30', 4, PLACE)
  browser = await launchBrowser()
  nurseContext = await browser.newContext({ locale: 'en-GB' })
  worklistPage = await nurseContext.newPage()
  episodePage = await nurseContext.newPage()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const worklistRow = () => worklistPage.locator('tbody tr', { hasText: 'Isolde' })

describe('a nurse books an infusion, the patient confirms from the e-mail, the worklist follows', () => {
  it('when the nurse opens the worklist first, then the patient has no visit booked', async () => {
    await signInThroughPage(worklistPage, served.baseUrl, f.nurse.email, f.nurse.password)
    await worklistPage.waitForURL(`${served.baseUrl}/screening`)
    await worklistPage.goto(`${served.baseUrl}/worklist`)
    await expect.poll(() => worklistRow().textContent()).toContain('none booked')
    // Still there at the end means the page was never reloaded.
    await worklistPage.evaluate(() => ((globalThis as unknown as { flMarker: string }).flMarker = 'not reloaded'))
  })

  it('when the nurse picks a session with free chairs on the episode page and books, then the visit is listed as booked', async () => {
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
    await expect.poll(() => episodePage.getByTestId('booking-saved').textContent()).toMatch(/Booked: Iron infusion on .* at 09:30 UK time/)
    await expect.poll(() => panel.getByTestId('appointment-status').first().textContent()).toContain('Booked')
  })

  it('when the outbox is drained, then one e-mail arrives with the time, place, link and a calendar file, and staff see it sent', async () => {
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
  })

  it('when the patient opens the link from the e-mail in their own browser and confirms, then the open worklist shows it confirmed', async () => {
    const [m] = await mail.to(f.email)
    // The link points at PUBLIC_URL; the test server listens on its own port, so keep the path.
    const path = /https?:\/\/[^\s/]+(\/reply\/[A-Za-z0-9_-]{43})/.exec(m!.text)![1]!
    const patient = await (await browser.newContext()).newPage()
    await patient.goto(served.baseUrl + path)
    await patient.getByRole('button', { name: 'Confirm' }).click()
    await patient.getByTestId('reply-confirmed').waitFor()

    await expect.poll(() => worklistRow().getByTestId('worklist-next-visit').textContent(), { timeout: 20_000, interval: 500 }).toMatch(/Iron infusion.*09:30.*Confirmed/s)
    expect(await worklistPage.evaluate(() => (globalThis as unknown as { flMarker?: string }).flMarker)).toBe('not reloaded')
  })

  it('then the episode page with its appointments panel has no serious accessibility findings', async () => {
    await expect.poll(() => episodePage.getByTestId('appointment-status').first().textContent(), { timeout: 20_000 }).toContain('Confirmed')
    expect(await seriousViolations(episodePage)).toEqual([])
  })
})
