import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from 'playwright-core'
import type { Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { makeTestApp, type TestApp } from './app'

/** Debian's Chromium, headless; the flags keep it from calling out on a closed network. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    args: ['--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'],
  })
}

/**
 * A fresh session (its own cookies) as the tests want it: British English and reduced motion, so
 * PrimeVue's fades end at once and axe reads colours at rest (a message caught half faded in fails
 * the contrast rule on a slow machine). Every browser test opens its pages through this.
 */
export function newTestContext(browser: Browser, options: BrowserContextOptions = {}): Promise<BrowserContext> {
  return browser.newContext({ locale: 'en-GB', reducedMotion: 'reduce', ...options })
}

export async function newTestPage(browser: Browser, options: BrowserContextOptions = {}): Promise<Page> {
  return (await newTestContext(browser, options)).newPage()
}

export interface ServedApp extends TestApp {
  baseUrl: string
  stop(): Promise<void>
}

/** The real app serving the client that `npm test` built, on a free loopback port. */
export async function serveBuiltApp(overrides: Record<string, string> = {}): Promise<ServedApp> {
  const staticDir = process.env.STATIC_DIR
  if (!staticDir) throw new Error('STATIC_DIR is not set: run the browser tests through npm test')
  const t = makeTestApp({ STATIC_DIR: staticDir, ...overrides })
  const server: Server = await new Promise((resolve) => {
    const s = t.app.listen(0, '127.0.0.1', () => resolve(s))
  })
  const { port } = server.address() as AddressInfo
  return {
    ...t,
    baseUrl: `http://127.0.0.1:${port}`,
    stop: async () => {
      server.closeAllConnections()
      await new Promise((r) => server.close(r))
      await t.close()
    },
  }
}

export async function signInThroughPage(page: Page, baseUrl: string, email: string, password: string): Promise<void> {
  await page.goto(`${baseUrl}/sign-in`)
  await page.fill('#email', email)
  await page.fill('#password', password)
  await page.getByRole('button', { name: 'Sign in' }).click()
}
