import { readFile } from 'node:fs/promises'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, newTestPage, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { seriousViolations } from '../helpers/pathwayBrowser'
import { retype } from '../helpers/clinicBrowser'
import { Outcome, Referral } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'
import { parseCsv } from '../api/reports-fixture'

let served: ServedApp
let browser: Browser
let nurse: StaffFixture
let admin: StaffFixture
let surgeon: StaffFixture

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  nurse = await makeStaff('nurse')
  admin = await makeStaff('admin')
  surgeon = await makeStaff('surgeon')
  browser = await launchBrowser()
})
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

/**
 * Each test's own operated episode. The operation's usual loss is 500 mL, so 1600 mL is over the
 * 3× caution line (shared/reports/outcomeWarnings).
 */
async function operatedEpisode() {
  return makeEpisode({
    surgeonId: surgeon.id,
    expectedBloodLossMl: 500,
    referral: { stage: 'operated', plannedSurgeryDate: addDays(todayIso(), -3) },
  })
}

/** The post-operative record through the API, as the nurse's form sends it; returns the new version. */
async function recordOutcomeThroughApi(c: Client, referralId: number, version = 1): Promise<number> {
  const res = await c.post(`/api/referrals/${referralId}/outcome`, {
    surgeryDate: todayIso(),
    bloodLossMl: 1600,
    unitsTransfusedIntraOp: 0,
    unitsTransfusedPostOp: 1,
    unitsCrossmatched: 2,
    lowestHbGL: 55,
    dischargeHbGL: 84,
    lengthOfStayDays: 4,
    complications: ['none'],
    version,
  })
  expect(res.status, JSON.stringify(res.body)).toBe(201)
  return Number(res.body.version)
}

async function signedIn(who: StaffFixture, home: string, options: Parameters<typeof newTestPage>[1] = {}): Promise<Page> {
  const page = await newTestPage(browser, { viewport: { width: 1280, height: 900 }, ...options })
  await signInThroughPage(page, served.baseUrl, who.email, who.password)
  await page.waitForURL(`${served.baseUrl}${home}`)
  return page
}

const text = async (page: Page, testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

describe('a nurse records what happened after surgery and closes the episode', () => {
  it(
    'when the lowest Hb is typed in g/dL below the caution line, then the ' + 'caution shows before saving and again from the server',
    async () => {
      const referralId = (await operatedEpisode()).referral.id
      const nursePage = await signedIn(nurse, '/screening')
      await nursePage.selectOption('#hb-unit', 'g/dL')
      await nursePage.goto(`${served.baseUrl}/referrals/${referralId}?tab=after-surgery`)
      expect(await text(nursePage, 'close-needs')).toMatch(/post-operative record, then the follow-up/)
      expect(await text(nursePage, 'close-needs-follow-up')).toMatch(/post-operative record and the follow-up first/)
      expect(await nursePage.locator('[data-move="closed"]').isDisabled()).toBe(true)
      // The episode was referred today (factory), so a surgery two days ago is refused by the server, under the field.
      await nursePage.fill('#oc-date', addDays(todayIso(), -2))
      await retype(nursePage, '#oc-loss', '1600')
      await retype(nursePage, '#oc-xm', '2')
      await retype(nursePage, '#oc-low', '5.5') // 5.5 g/dL = 55 g/L (× 10, clinical reference §7)
      await retype(nursePage, '#oc-dis', '8.4')
      await retype(nursePage, '#oc-stay', '4')
      await nursePage.click('label[for="oc-c-none"]')
      await expect.poll(() => text(nursePage, 'outcome-cautions')).toMatch(/more than 3× this operation's usual 500 mL/)
      expect(await text(nursePage, 'outcome-cautions')).toMatch(/Lowest Hb 55 g\/L is below 60 g\/L/)
      expect(await seriousViolations(nursePage)).toEqual([])
      await nursePage.screenshot({ path: '/tmp/outcomes-record-form.png', fullPage: true })
      await nursePage.getByRole('button', { name: 'Save the post-operative record' }).click()
      await expect
        .poll(() => nursePage.locator('#oc-date').locator('xpath=..').textContent())
        .toMatch(/Surgery date is before the referral date/)
      expect(await Outcome.count({ where: { referralId } })).toBe(0)
      await nursePage.fill('#oc-date', todayIso())
      await nursePage.getByRole('button', { name: 'Save the post-operative record' }).click()
      await nursePage.getByTestId('outcome-summary').waitFor()
      expect(await text(nursePage, 'outcome-summary')).toMatch(/1600 mL/)
      expect(await text(nursePage, 'outcome-summary')).toMatch(/5\.5 g\/dL/)
      expect(await text(nursePage, 'outcome-cautions')).toMatch(/Lowest Hb 55 g\/L/)
      const saved = (await Outcome.findOne({ where: { referralId } }))!
      expect(saved.lowestHbGL).toBe(55)
      expect(saved.dischargeHbGL).toBe(84)
      await nursePage.context().close()
    },
  )

  it('when the follow-up is recorded, then closing is offered, and the closed episode is read-only', async () => {
    // This test's own episode with its post-operative record already in (1600 mL, lowest Hb 55 g/L).
    const referralId = (await operatedEpisode()).referral.id
    await recordOutcomeThroughApi(await new Client(served.app).mustSignIn(nurse.email, nurse.password), referralId)
    const nursePage = await signedIn(nurse, '/screening')
    await nursePage.selectOption('#hb-unit', 'g/dL')
    await nursePage.goto(`${served.baseUrl}/referrals/${referralId}?tab=after-surgery`)
    await nursePage.getByTestId('outcome-summary').waitFor()
    expect(await text(nursePage, 'close-needs')).toMatch(/the follow-up after discharge/)
    await retype(nursePage, '#fu-hb', '10.8')
    await nursePage.click('label[for="fu-iron-yes"]')
    await nursePage.getByRole('button', { name: 'Save the follow-up' }).click()
    await expect.poll(() => text(nursePage, 'follow-up-summary')).toMatch(/10\.8 g\/dL/)
    expect(await text(nursePage, 'close-ready')).toMatch(/can now be closed/)
    expect(await seriousViolations(nursePage)).toEqual([])
    await nursePage.screenshot({ path: '/tmp/outcomes-ready-to-close.png', fullPage: true })
    await nursePage.click('[data-move="closed"]')
    await nursePage.getByTestId('confirm-move').click()
    await nursePage.getByTestId('read-only-banner').waitFor()
    expect((await Referral.findByPk(referralId))!.stage).toBe('closed')
    // Read-only: the record is shown, no form is offered.
    await nursePage.goto(`${served.baseUrl}/referrals/${referralId}?tab=after-surgery`)
    await nursePage.getByTestId('follow-up-summary').waitFor()
    expect(await nursePage.locator('#oc-loss, #fu-hb').count()).toBe(0)
    await nursePage.context().close()
  })
})

describe('an admin finds the patient in the audit trail', () => {
  it('when searching by MRN and opening the closing entry, then it shows the stage before and after', async () => {
    // This test's own closed episode, closed through the API as the pages would do it.
    const { patient, referral } = await operatedEpisode()
    const mrn = patient.mrn
    const asNurse = await new Client(served.app).mustSignIn(nurse.email, nurse.password)
    const afterOutcome = await recordOutcomeThroughApi(asNurse, referral.id)
    const fu = await asNurse.post(`/api/referrals/${referral.id}/follow-up`, {
      recheckHbGL: 108,
      recheckDate: todayIso(),
      ironAfterSurgery: true,
      version: afterOutcome,
    })
    expect(fu.status, JSON.stringify(fu.body)).toBe(201)
    const closed = await asNurse.post(`/api/referrals/${referral.id}/transitions`, { to: 'closed', version: fu.body.version })
    expect(closed.status, JSON.stringify(closed.body)).toBe(200)

    const adminPage = await signedIn(admin, '/admin', { acceptDownloads: true })
    await adminPage.goto(`${served.baseUrl}/admin/audit`)
    // Administrators read no patient record: the trail is filtered by the MRN, matched on the server.
    await adminPage.fill('#au-patient', mrn)
    await adminPage.press('#au-patient', 'Enter')
    await adminPage.waitForURL(/mrn=/)
    const row = adminPage.locator('tr', { hasText: 'transition' }).first()
    await row.waitFor()
    await row.locator('button').first().click()
    const diff = adminPage.getByTestId('audit-diff').first()
    await diff.waitFor()
    const rowText = async (field: string) =>
      (await diff.locator('tr', { has: adminPage.locator(`th:text-is("${field}")`) }).textContent()) ?? ''
    expect(await rowText('stage')).toMatch(/operated\s*closed\s*Changed/)
    expect(await seriousViolations(adminPage)).toEqual([])
    await adminPage.screenshot({ path: '/tmp/audit-trail.png', fullPage: true })
    // The export is the server's CSV for the same search: one row per entry the screen counts.
    const total = Number(/(\d+) entr/.exec((await adminPage.getByText(/entr(y|ies) match/).textContent()) ?? '')?.[1])
    const [download] = await Promise.all([adminPage.waitForEvent('download'), adminPage.getByTestId('audit-csv').click()])
    const rows = parseCsv(await readFile((await download.path())!, 'utf8'))
    // Open episode pages in the other tabs keep adding audited reads of this patient, so the
    // export may hold a few more entries than the screen counted a moment before; all are hers.
    expect(rows.length).toBeGreaterThanOrEqual(total)
    expect(new Set(rows.map((r) => r.patientId)).size).toBe(1)
    expect(rows.some((r) => r.action === 'transition' && r.entity === 'referral')).toBe(true)
    await adminPage.context().close()
  })
})

describe('the top bar fits for every role', () => {
  for (const width of [1280, 1024]) {
    it(`when the window is ${width} px wide, then every role's bar stays on one line and the set-up pages sit in one menu`, async () => {
      // Each width signs in its own four sessions: nothing carries over from another test.
      const pages = {} as Record<'admin' | 'nurse' | 'doctor' | 'surgeon', Page>
      for (const role of ['admin', 'nurse', 'doctor', 'surgeon'] as const) {
        const s = await makeStaff(role)
        const p = await newTestPage(browser)
        await signInThroughPage(p, served.baseUrl, s.email, s.password)
        await p.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
        pages[role] = p
      }
      const { admin: adminPage, nurse: nursePage } = pages
      for (const [who, page] of Object.entries(pages)) {
        await page.setViewportSize({ width, height: 800 })
        // Administrators read no patient record, so no worklist: their bar is checked on their home.
        await page.goto(`${served.baseUrl}${who === 'admin' ? '/admin' : '/worklist'}`)
        const bar = page.locator('header.app-shell__bar')
        await bar.waitFor()
        const box = (await bar.boundingBox())!
        // One row of links: the bar is as tall as a single line (3.25 rem at 14 px = 45.5 px), nothing scrolls sideways.
        expect(box.height, `${who} at ${width}`).toBeLessThan(60)
        expect(await page.evaluate('document.documentElement.scrollWidth <= window.innerWidth')).toBe(true)
        await page.screenshot({ path: `/tmp/nav-${who}-${width}.png`, clip: { x: 0, y: 0, width, height: 120 } })
      }
      expect(await nursePage.locator('[data-nav="readiness"]').count()).toBe(1)
      expect(await adminPage.locator('[data-nav="admin-users"]').count()).toBe(0)
      // The imports page stays (the batch list names no patient); the clinical lists go.
      for (const clinical of ['worklist', 'readiness'])
        expect(await adminPage.locator(`[data-nav="${clinical}"]`).count(), clinical).toBe(0)
      // Keyboard: the Set-up button opens its menu with Enter, like any button.
      await adminPage.focus('[data-nav="set-up"]')
      await adminPage.keyboard.press('Enter')
      await adminPage.getByRole('menuitem', { name: 'Audit trail' }).waitFor()
      expect(await seriousViolations(adminPage)).toEqual([])
      await adminPage.screenshot({ path: `/tmp/nav-admin-menu-${width}.png`, clip: { x: 0, y: 0, width, height: 400 } })
      await adminPage.keyboard.press('Escape')
      for (const p of Object.values(pages)) await p.context().close()
    })
  }
})
