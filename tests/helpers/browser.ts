import { chromium, type Browser, type BrowserContext, type BrowserContextOptions, type Page } from 'playwright-core'
import { createServer, type RequestListener, type Server } from 'node:http'
import type { AddressInfo } from 'node:net'
import { makeTestApp, type TestApp } from './app'

/** Debian's Chromium, headless; the flags keep it from calling out on a closed network. */
export function launchBrowser(): Promise<Browser> {
  return chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    headless: true,
    args: [
      '--no-sandbox',
      '--disable-gpu',
      '--disable-quic',
      '--no-first-run',
      '--disable-background-networking',
      '--disable-component-update',
      '--disable-sync',
      '--disable-dev-shm-usage',
    ],
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

/**
 * The real app serving the client that `npm test` built, on a free loopback port. `overrides`
 * may be a function of the app's own URL, for settings that must name it (an OIDC redirect URI).
 */
export async function serveBuiltApp(
  overrides: Record<string, string> | ((baseUrl: string) => Promise<Record<string, string>>) = {},
): Promise<ServedApp> {
  const staticDir = process.env.STATIC_DIR
  if (!staticDir) throw new Error('STATIC_DIR is not set: run the browser tests through npm test')
  let handler: RequestListener = (_req, res) => res.writeHead(503).end()
  const server: Server = await new Promise((resolve) => {
    const s = createServer((req, res) => handler(req, res)).listen(0, '127.0.0.1', () => resolve(s))
  })
  const { port } = server.address() as AddressInfo
  const baseUrl = `http://127.0.0.1:${port}`
  const extra = typeof overrides === 'function' ? await overrides(baseUrl) : overrides
  const t = makeTestApp({ STATIC_DIR: staticDir, ...extra })
  handler = t.app
  return {
    ...t,
    baseUrl,
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
