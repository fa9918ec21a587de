/**
 * What the browser really fetches for the sign-in page (issue #19): the built client in real
 * Chromium, JavaScript counted as the responses arrive (gzip), once the page is idle, and again
 * after a first submit (the form's validator is fetched then). The manifest count in bundle.ts
 * misses chunks imported at mount; this one cannot. The API answers as Ferrolane's does to a
 * visitor who is not signed in (no session, local passwords, a wrong password), so the bundle
 * part still needs no database.
 */
import { createServer, type IncomingMessage, type ServerResponse } from 'node:http'
import { readFile } from 'node:fs/promises'
import { gzipSync } from 'node:zlib'
import path from 'node:path'
import type { AddressInfo } from 'node:net'
import { launchBrowser } from '../../tests/helpers/browser'

const TYPES: Record<string, string> = {
  '.js': 'text/javascript',
  '.css': 'text/css',
  '.html': 'text/html',
  '.svg': 'image/svg+xml',
  '.woff2': 'font/woff2',
}

function api(req: IncomingMessage, res: ServerResponse): void {
  const send = (status: number, body: unknown) => {
    res.writeHead(status, { 'Content-Type': 'application/json' })
    res.end(JSON.stringify(body))
  }
  const url = req.url ?? ''
  if (url.startsWith('/api/auth/providers')) return send(200, { local: 'on', directory: null })
  if (url.startsWith('/api/auth/csrf')) return send(200, { csrfToken: 'bench' })
  if (url.startsWith('/api/auth/login')) return send(401, { error: { code: 'invalid_credentials', message: 'Wrong e-mail or password' } })
  send(401, { error: { code: 'unauthenticated', message: 'Sign in first' } })
}

async function serve(distDir: string) {
  const server = createServer((req, res) => {
    if ((req.url ?? '').startsWith('/api/')) return api(req, res)
    const wanted = path.normalize(decodeURIComponent((req.url ?? '/').split('?')[0]!)).replace(/^(\.\.[/\\])+/, '')
    const file = path.join(distDir, wanted.startsWith('/assets/') ? wanted : 'index.html') // the app's own routes get index.html
    readFile(file).then(
      (body) => {
        res.writeHead(200, { 'Content-Type': TYPES[path.extname(file)] ?? 'application/octet-stream' })
        res.end(body)
      },
      () => {
        res.writeHead(404)
        res.end()
      },
    )
  })
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve))
  const url = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
  return { url, close: () => new Promise<void>((r) => server.close(() => r())) }
}

export async function signInFetched(distDir: string): Promise<{ atLoadKB: number; afterSubmitKB: number; scripts: number }> {
  const site = await serve(distDir)
  const browser = await launchBrowser()
  try {
    const page = await browser.newPage()
    const bodies: Promise<Buffer>[] = []
    page.on('response', (r) => {
      if (r.request().resourceType() === 'script') bodies.push(r.body())
    })
    const kb = async () => +((await Promise.all(bodies)).reduce((s, b) => s + gzipSync(b).length, 0) / 1024).toFixed(1)
    await page.goto(`${site.url}/sign-in`, { waitUntil: 'networkidle' })
    await page.waitForSelector('#email')
    const atLoadKB = await kb()
    const scripts = bodies.length
    await page.fill('#email', 'someone@ferrolane.test')
    await page.fill('#password', 'not-the-password')
    await page.getByRole('button', { name: 'Sign in' }).click()
    await page.waitForSelector('[data-testid="sign-in-error"]')
    await page.waitForLoadState('networkidle')
    return { atLoadKB, afterSubmitKB: await kb(), scripts }
  } finally {
    await browser.close()
    await site.close()
  }
}
