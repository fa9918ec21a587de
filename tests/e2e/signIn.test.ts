import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser } from 'playwright-core'
import { launchBrowser, newTestContext, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { ROLES, type Role } from '../../shared/roles'
import { gzipSync } from 'node:zlib'

let served: ServedApp
let browser: Browser
const staff = {} as Record<Role, StaffFixture>

const HOME: Record<Role, { path: string; heading: RegExp }> = {
  nurse: { path: '/screening', heading: /Screening/ },
  doctor: { path: '/clinic', heading: /Anaemia clinic/ },
  surgeon: { path: '/theatre', heading: /Theatre readiness/ },
  admin: { path: '/admin', heading: /Administration/ },
}

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  for (const role of ROLES) staff[role] = await makeStaff(role)
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

describe('signing in through the real page', () => {
  it('then the sign-in page has no serious or critical accessibility violation', async () => {
    const context = await newTestContext(browser)
    const page = await context.newPage()
    await page.goto(`${served.baseUrl}/sign-in`)
    await page.waitForSelector('#email')
    expect(await seriousViolations(page)).toEqual([])
    await context.close()
  })

  it('then the sign-in page loads under 110 kB of JavaScript, gzipped, and nothing from another origin', async () => {
    const context = await newTestContext(browser)
    const page = await context.newPage()
    const scripts: Promise<Buffer>[] = []
    const origins = new Set<string>()
    page.on('request', (r) => origins.add(new URL(r.url()).origin))
    page.on('response', (r) => {
      if (r.request().resourceType() === 'script') scripts.push(r.body())
    })
    await page.goto(`${served.baseUrl}/sign-in`, { waitUntil: 'networkidle' })
    const gzipped = (await Promise.all(scripts)).reduce((sum, b) => sum + gzipSync(b).length, 0)
    expect(gzipped).toBeGreaterThan(10_000) // it did load the app
    // Issue #19: the browser loads 104 kB at sign-in (the bench's signInFetchedJsGzipKB; 131 kB
    // before the form dropped vee-validate and fetched its validator at the first submit). This
    // bound (200 kB before the theme split, then 135 kB) keeps what was gained.
    expect(gzipped).toBeLessThan(110 * 1024)
    expect([...origins]).toEqual([served.baseUrl])
    await context.close()
  })

  it('when the password is wrong, then the page says so and stays on sign-in', async () => {
    const page = await newTestPage(browser)
    await signInThroughPage(page, served.baseUrl, staff.nurse.email, 'definitely-not-it')
    await expect.poll(() => page.getByTestId('sign-in-error').textContent()).toMatch(/do not match/)
    expect(new URL(page.url()).pathname).toBe('/sign-in')
    await page.close()
  })

  for (const role of ROLES) {
    it(`when a ${role} signs in, then they land on their home, which passes axe`, async () => {
      const context = await newTestContext(browser)
      const page = await context.newPage()
      await signInThroughPage(page, served.baseUrl, staff[role].email, staff[role].password)
      await page.waitForURL(`${served.baseUrl}${HOME[role].path}`)
      await expect.poll(() => page.locator('h1').first().textContent()).toMatch(HOME[role].heading)
      expect(await seriousViolations(page)).toEqual([])
      await context.close()
    })
  }

  it('when a nurse opens the admin URL, then they are turned away', async () => {
    const context = await newTestContext(browser)
    const page = await context.newPage()
    await signInThroughPage(page, served.baseUrl, staff.nurse.email, staff.nurse.password)
    await page.waitForURL(`${served.baseUrl}/screening`)
    await page.goto(`${served.baseUrl}/admin/users`)
    await expect.poll(() => page.locator('h1').first().textContent()).toMatch(/access/i)
    expect(await page.locator('text=Staff accounts').count()).toBe(0)
    await context.close()
  })

  it('when signed out, then opening a page sends the user to sign-in', async () => {
    const page = await newTestPage(browser)
    await page.goto(`${served.baseUrl}/admin/users`)
    await page.waitForURL(/\/sign-in/)
    await page.close()
  })
})
