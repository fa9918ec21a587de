import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, newTestContext, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff } from '../helpers/factories'
import { User } from '../../server/models/index'

/**
 * Issue #15's left-over: someone given a temporary password must replace it before anything
 * else, in the real browser, and lands on their own home afterwards; an expired one is refused.
 */
let served: ServedApp
let browser: Browser

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/** An account as an administrator's reset leaves it: a temporary password that must be replaced. */
async function temporaryAccount(expiresInHours: number) {
  const s = await makeStaff('doctor', { mustChangePassword: true })
  await User.update({ temporaryPasswordExpiresAt: new Date(Date.now() + expiresInHours * 3_600_000) }, { where: { id: s.id } })
  return s
}

describe('signing in with a temporary password', () => {
  it('then the person must choose a new one (the breached list applies), and lands on their home', async () => {
    const doctor = await temporaryAccount(24)
    const context = await newTestContext(browser)
    const page = await context.newPage()
    await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
    await page.waitForURL(`${served.baseUrl}/account/password`)
    await expect.poll(() => page.locator('h1').first().textContent()).toBe('Change password')
    await expect.poll(() => page.getByText('You signed in with a temporary password').isVisible()).toBe(true)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '.test-data/password-forced.png', fullPage: true })

    // Any other address brings the person back here until the password is replaced.
    await page.goto(`${served.baseUrl}/worklist`)
    await page.waitForURL(`${served.baseUrl}/account/password`)

    // 123qweasdzxc: 12 characters, on the shipped breached list (server/security/common-passwords.txt).
    await page.fill('#current-password', doctor.password)
    await page.fill('#new-password', '123qweasdzxc')
    await page.fill('#confirm-password', '123qweasdzxc')
    await page.getByRole('button', { name: 'Save new password' }).click()
    await expect.poll(() => page.locator('#new-password-error').textContent()).toMatch(/common|leaked|breached/i)
    expect(new URL(page.url()).pathname).toBe('/account/password')
    await page.screenshot({ path: '.test-data/password-breached.png', fullPage: true })

    const fresh = 'Quiet-heron-under-47-lanterns'
    await page.fill('#new-password', fresh)
    await page.fill('#confirm-password', fresh)
    await page.getByRole('button', { name: 'Save new password' }).click()
    await page.waitForURL(`${served.baseUrl}/clinic`)
    await expect.poll(() => page.locator('h1').first().textContent()).toMatch(/Anaemia clinic/)
    await expect.poll(() => page.getByTestId('worklist-count').first().textContent()).toMatch(/^\d+$/)
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '.test-data/password-landed.png', fullPage: true })
    await context.close()

    // The new password is the one that works from now on, straight to the home screen.
    const again = await (await newTestContext(browser)).newPage()
    await signInThroughPage(again, served.baseUrl, doctor.email, fresh)
    await again.waitForURL(`${served.baseUrl}/clinic`)
    await again.context().close()
  })

  it('when the temporary password has expired, then sign-in is refused with a message saying what to do', async () => {
    const doctor = await temporaryAccount(-1)
    const context = await newTestContext(browser)
    const page = await context.newPage()
    await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
    await expect.poll(() => page.getByTestId('sign-in-error').textContent()).toMatch(/temporary password has expired.*administrator/i)
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    expect(await seriousViolations(page)).toEqual([])
    await page.screenshot({ path: '.test-data/password-expired.png', fullPage: true })
    await context.close()
  })
})
