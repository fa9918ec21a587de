/**
 * Requests per minute from one open screen in real Chromium: the doctor's home (count tiles and
 * the clinic list) and one open episode, each watched for BENCH_POLL_SECONDS (default 60) after
 * it has loaded, then for a while with the tab hidden. Counts every /api/ request, how many were
 * answered 304 (nothing changed), and the body bytes the answers carried.
 */
import mariadb from 'mariadb'
import type { Page } from 'playwright-core'
import { launchBrowser } from '../../tests/helpers/browser'
import { hashPassword } from '../../server/services/passwords'
import { BENCH_PASSWORD } from './benchData'
import { signIn, startBenchServer } from './server'

const WATCH_S = Number(process.env.BENCH_POLL_SECONDS || 60)
const HIDDEN_S = Math.min(30, WATCH_S)
const DOCTOR = 'bench.doctor@ferrolane.test'

interface Tally {
  requests: number
  notModified: number
  bytes: number
  /** Requests per endpoint, ids replaced by :id and the query left off (which poll makes them). */
  byPath: Record<string, number>
}

/** The bench database has nurses and surgeons only; the doctor is added once, with the same password. */
async function prepareDoctor(env: NodeJS.ProcessEnv): Promise<number> {
  const conn = await mariadb.createConnection({
    host: '127.0.0.1',
    port: Number(env.DB_PORT),
    user: env.DB_USER,
    password: env.DB_PASSWORD,
    database: env.DB_NAME,
  })
  try {
    const [doctor] = await conn.query('SELECT id FROM users WHERE email = ?', [DOCTOR])
    if (!doctor) {
      const now = new Date()
      await conn.query('INSERT INTO users (email, name, role, password_hash, created_at, updated_at) VALUES (?, ?, ?, ?, ?, ?)', [
        DOCTOR,
        'Bench Doctor',
        'doctor',
        await hashPassword(BENCH_PASSWORD),
        now,
        now,
      ])
    }
    const [episode] = await conn.query("SELECT id FROM referrals WHERE stage = 'clinic' ORDER BY id LIMIT 1")
    return Number(episode.id)
  } finally {
    await conn.end()
  }
}

function tally(page: Page): { take(): Tally } {
  const empty = (): Tally => ({ requests: 0, notModified: 0, bytes: 0, byPath: {} })
  let t = empty()
  page.on('response', (res) => {
    const pathname = new URL(res.url()).pathname
    if (!pathname.startsWith('/api/')) return
    t.requests += 1
    const key = pathname.replace(/\/\d+(?=\/|$)/g, '/:id')
    t.byPath[key] = (t.byPath[key] ?? 0) + 1
    if (res.status() === 304) t.notModified += 1
    t.bytes += Number(res.headers()['content-length'] ?? 0)
  })
  return {
    take: () => {
      const out = t
      t = empty()
      return out
    },
  }
}

/** Hides or shows the tab as the browser does when the user switches away (document.visibilityState). */
async function setHidden(page: Page, hidden: boolean): Promise<void> {
  // A string, not a function: tsx would wrap a function in helpers the page does not have.
  await page.evaluate(`(() => {
    const h = ${hidden}
    Object.defineProperty(document, 'visibilityState', { configurable: true, get: () => (h ? 'hidden' : 'visible') })
    Object.defineProperty(document, 'hidden', { configurable: true, get: () => h })
    document.dispatchEvent(new Event('visibilitychange', { bubbles: true })) // TanStack Query listens on window
  })()`)
}

const sleep = (s: number) => new Promise((r) => setTimeout(r, s * 1000))
const perMin = (n: number, seconds: number) => +((n * 60) / seconds).toFixed(1)

async function watch(page: Page, url: string, ready: string) {
  const counter = tally(page)
  await page.goto(url)
  await page.locator(ready).first().waitFor({ timeout: 60_000 })
  await sleep(3) // the first load's requests settle
  counter.take()
  await sleep(WATCH_S)
  const shown = counter.take()
  await setHidden(page, true)
  await sleep(1)
  counter.take()
  await sleep(HIDDEN_S)
  const hidden = counter.take()
  await setHidden(page, false)
  await sleep(2)
  const back = counter.take()
  return {
    requestsPerMin: perMin(shown.requests, WATCH_S),
    notModifiedPerMin: perMin(shown.notModified, WATCH_S),
    // Issue 19 (new key): answers that carried a whole body, i.e. not a 304.
    fullAnswersPerMin: perMin(shown.requests - shown.notModified, WATCH_S),
    bodyKBPerMin: +((shown.bytes * 60) / WATCH_S / 1024).toFixed(1),
    hiddenRequestsPerMin: perMin(hidden.requests, HIDDEN_S),
    // New key: requests per minute by endpoint while shown, to tell which poll makes them.
    requestsPerMinByPath: Object.fromEntries(Object.entries(shown.byPath).map(([k, n]) => [k, perMin(n, WATCH_S)])),
    refetchedOnReturn: back.requests > 0,
  }
}

/** One built client served by the bench server: the doctor's home, then one open episode. */
async function watchClient(env: NodeJS.ProcessEnv, distDir: string, episodeId: number) {
  const server = await startBenchServer(env, 18_000 + Math.floor(Math.random() * 2000), distDir)
  const browser = await launchBrowser()
  try {
    const cookie = await signIn(server.url, DOCTOR, BENCH_PASSWORD)
    const [name, value] = [cookie.slice(0, cookie.indexOf('=')), cookie.slice(cookie.indexOf('=') + 1)]
    const context = await browser.newContext({ locale: 'en-GB' })
    await context.addCookies([{ name, value, url: server.url }])
    const page = await context.newPage()
    const doctorHome = await watch(page, `${server.url}/`, '[data-testid="worklist-count"]')
    const episode = await watch(page, `${server.url}/referrals/${episodeId}`, 'h1')
    return { doctorHome, episode }
  } finally {
    await browser.close()
    await server.stop()
  }
}

/**
 * BENCH_POLL_DIST: serve another built client instead of this one. BENCH_POLL_BEFORE_DIST: also
 * watch an older build in the same run, printed under `before` (new key), to compare the two.
 */
export async function benchPolls(env: NodeJS.ProcessEnv, distDir: string) {
  const episodeId = await prepareDoctor(env)
  const now = await watchClient(env, process.env.BENCH_POLL_DIST || distDir, episodeId)
  const beforeDist = process.env.BENCH_POLL_BEFORE_DIST
  const before = beforeDist ? await watchClient(env, beforeDist, episodeId) : undefined
  return { bench: 'polls', watchSeconds: WATCH_S, hiddenSeconds: HIDDEN_S, ...now, ...(before ? { before } : {}) }
}
