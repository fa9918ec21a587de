import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import AxeBuilder from '@axe-core/playwright'
import { launchBrowser, serveBuiltApp, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { startTestDirectory, person, type TestDirectory } from '../helpers/directory'
import type { DirectoryPerson } from '../../seed/demo/directory'

let idp: TestDirectory
let served: ServedApp
let browser: Browser
const nurse = person(['All-Staff', 'Anaemia-Nurses'], { name: 'Rosa Achterberg' })
const porter = person(['All-Staff', 'Portering'], { name: 'Pavla Havel' })

beforeAll(async () => {
  served = await serveBuiltApp(async (baseUrl) => {
    idp = await startTestDirectory([nurse, porter], baseUrl)
    return idp.appEnv
  })
  await cleanDatabase(served.sequelize)
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
  await idp?.stop()
})

async function seriousViolations(page: Page) {
  const results = await new AxeBuilder({ page }).withTags(['wcag2a', 'wcag2aa', 'wcag21aa', 'wcag22aa']).analyze()
  return results.violations.filter((v) => v.impact === 'serious' || v.impact === 'critical').map((v) => `${v.id}: ${v.help}`)
}

async function signInAtProvider(page: Page, who: DirectoryPerson) {
  await page.goto(`${served.baseUrl}/sign-in`)
  await page.getByRole('link', { name: 'Sign in with Test Hospital directory' }).click()
  await page.waitForURL(`${idp.issuer}/**`)
  await expect.poll(() => page.locator('h1').textContent()).toBe('Sign in to the staff directory')
  await page.fill('#login', who.email)
  await page.fill('#password', who.password)
  await page.getByRole('button', { name: 'Sign in' }).click()
  await expect.poll(() => page.locator('h1').textContent()).toBe('Allow access')
  await page.getByRole('button', { name: 'Allow', exact: true }).click()
}

describe('signing in through the hospital directory in a real browser', () => {
  it('then the sign-in page offers "Sign in with" the directory above the local form, and passes axe', async () => {
    const context = await browser.newContext()
    const page = await context.newPage()
    await page.goto(`${served.baseUrl}/sign-in`)
    const link = page.getByTestId('sign-in-directory')
    await expect.poll(() => link.textContent()).toMatch(/Sign in with Test Hospital directory/)
    const linkBox = (await link.boundingBox())!
    const formBox = (await page.locator('#email').boundingBox())!
    expect(linkBox.y).toBeLessThan(formBox.y)
    await page.screenshot({ path: '.test-data/directory-sign-in.png' })
    expect(await seriousViolations(page)).toEqual([])
    await context.close()
  })

  it('when a nurse signs in at the provider, then she lands on her home, and signing out ends both sessions', async () => {
    const context = await browser.newContext()
    const page = await context.newPage()
    await signInAtProvider(page, nurse)
    await page.waitForURL(`${served.baseUrl}/screening`)
    await expect.poll(() => page.locator('h1').first().textContent()).toMatch(/Screening/)
    await expect.poll(() => page.getByTestId('shell-user-name').textContent()).toBe('Rosa Achterberg')

    await page.getByTestId('account-menu').click()
    await page.getByRole('menuitem', { name: 'Sign out' }).click()
    await page.waitForURL(`${idp.issuer}/**`)
    await expect.poll(() => page.locator('h1').textContent()).toBe('Sign out of the staff directory?')
    await page.getByRole('button', { name: 'Yes, sign me out' }).click()
    await page.waitForURL(`${served.baseUrl}/sign-in?signedOut=1`)
    await expect.poll(() => page.getByTestId('signed-out').textContent()).toMatch(/signed out of Ferrolane and of Test Hospital directory/)
    expect(await seriousViolations(page)).toEqual([])

    // Both ends forgot her: Ferrolane sends her to sign in, and the directory asks for her password again.
    await page.goto(`${served.baseUrl}/screening`)
    await page.waitForURL(/\/sign-in/)
    await page.getByRole('link', { name: 'Sign in with Test Hospital directory' }).click()
    await expect.poll(() => page.locator('h1').textContent()).toBe('Sign in to the staff directory')
    await context.close()
  })

  it('when someone in no Ferrolane group signs in, then a clear refusal page says why, and passes axe', async () => {
    const context = await browser.newContext()
    const page = await context.newPage()
    await signInAtProvider(page, porter)
    await page.waitForURL(`${served.baseUrl}/sign-in/refused?reason=no-role`)
    await expect.poll(() => page.locator('h1').first().textContent()).toBe('Your directory account has no Ferrolane role')
    await expect.poll(() => page.getByTestId('refusal-reason').textContent()).toMatch(/none of your directory groups/)
    await page.screenshot({ path: '.test-data/directory-refused.png' })
    expect(await seriousViolations(page)).toEqual([])
    await context.close()
  })
})
