import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import AxeBuilder from '@axe-core/playwright'
import * as OTPAuth from 'otpauth'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'

let served: ServedApp
let browser: Browser
let admin: StaffFixture

beforeAll(async () => {
  served = await serveBuiltApp({ ADMIN_SECOND_FACTOR_REQUIRED: 'true' })
  await cleanDatabase(served.sequelize)
  admin = await makeStaff('admin', { name: 'Cormac Duvall' })
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

async function seriousViolations(page: Page) {
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21aa', 'wcag22aa']).analyze()
  return results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`)
}

/** What the phone's authenticator app shows, `stepsAhead` periods from now. */
function phone(secret: string, stepsAhead = 0): string {
  return new OTPAuth.TOTP({ secret: OTPAuth.Secret.fromBase32(secret), digits: 6, period: 30 }).generate({
    timestamp: Date.now() + stepsAhead * 30_000,
  })
}

describe('an administrator sets up and uses an authenticator in a real browser', () => {
  it(
    'when an admin first signs in with a password, then they must enrol, see the QR code and recovery codes once, and next time ' +
      'give a code',
    async () => {
      const context = await browser.newContext()
      const page = await context.newPage()
      await signInThroughPage(page, served.baseUrl, admin.email, admin.password)
      await page.waitForURL(`${served.baseUrl}/account/authenticator`)
      await expect.poll(() => page.locator('h1').first().textContent()).toBe('Authenticator')
      expect(await seriousViolations(page)).toEqual([])

      await page.getByRole('button', { name: 'Set up an authenticator' }).click()
      const secret = (await page.getByTestId('second-factor-secret').textContent())!.trim()
      const qr = page.getByRole('img', { name: /QR code/ })
      expect(await qr.getAttribute('src')).toMatch(/^data:image\/svg\+xml;base64,/)
      expect(await qr.evaluate((img) => (img as unknown as { naturalWidth: number }).naturalWidth)).toBeGreaterThan(0)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '.test-data/second-factor-enrol.png' })

      await page.fill('#second-factor-code', phone(secret))
      await page.getByRole('button', { name: 'Confirm' }).click()
      const codes = page.getByTestId('recovery-codes').locator('li')
      await expect.poll(() => codes.count()).toBe(10)
      expect(await seriousViolations(page)).toEqual([])
      await page.screenshot({ path: '.test-data/second-factor-codes.png' })
      await page.getByRole('button', { name: 'I have kept my recovery codes' }).click()
      await page.waitForURL(`${served.baseUrl}/admin`)

      await page.getByTestId('account-menu').click()
      await page.getByRole('menuitem', { name: 'Sign out' }).click()
      await page.waitForURL(/\/sign-in/)
      await signInThroughPage(page, served.baseUrl, admin.email, admin.password)
      await page.waitForSelector('#sign-in-code')
      expect(await seriousViolations(page)).toEqual([])
      await page.fill('#sign-in-code', '000000' === phone(secret, 1) ? '111111' : '000000')
      await page.getByRole('button', { name: 'Continue' }).click()
      await expect.poll(() => page.getByTestId('code-error').textContent()).toMatch(/not right/)
      await page.fill('#sign-in-code', phone(secret, 1))
      await page.getByRole('button', { name: 'Continue' }).click()
      await page.waitForURL(`${served.baseUrl}/admin`)
      await context.close()
    },
  )
})
