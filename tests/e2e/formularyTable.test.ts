import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Browser, Page } from 'playwright-core'
import { launchBrowser, serveBuiltApp, signInThroughPage, type ServedApp } from '../helpers/browser'
import { cleanDatabase } from '../helpers/app'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { loadStarterFormulary, makeEpisode } from '../helpers/clinicFactories'
import { pickOption, seriousViolations } from '../helpers/pathwayBrowser'
import { retype } from '../helpers/clinicBrowser'
import { AuditEntry, IronProductRow } from '../../server/models/index'
import { addDays, todayIso } from '../../shared/pathway'

const SHOTS = process.env.FERROLANE_SCREENSHOTS // a directory to save screenshots in, when set
let served: ServedApp
let browser: Browser
let admin: StaffFixture
let doctor: StaffFixture
let page: Page
const episodes: Record<'table' | 'late' | 'small', number> = { table: 0, late: 0, small: 0 }
const yearsAgo = (n: number) => addDays(todayIso(), -Math.round(n * 365.25) - 30)

beforeAll(async () => {
  served = await serveBuiltApp()
  await cleanDatabase(served.sequelize)
  await loadStarterFormulary()
  admin = await makeStaff('admin')
  doctor = await makeStaff('doctor')
  const surgeon = await makeStaff('surgeon')
  // Invented patients: a 60 kg woman with Hb 95 g/L and surgery in 9 weeks; the same 10 days before
  // surgery; a 12-year-old of 30 kg with Hb 90 g/L and surgery in 9 weeks.
  const clinic = { stage: 'clinic' as const }
  episodes.table = (
    await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 60,
      heightCm: 160,
      hb: [{ hbGL: 95 }],
      referral: { ...clinic, plannedSurgeryDate: addDays(todayIso(), 63) },
    })
  ).referral.id
  episodes.late = (
    await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 60,
      heightCm: 160,
      hb: [{ hbGL: 95 }],
      referral: { ...clinic, plannedSurgeryDate: addDays(todayIso(), 10) },
    })
  ).referral.id
  episodes.small = (
    await makeEpisode({
      surgeonId: surgeon.id,
      weightKg: 30,
      heightCm: 140,
      hb: [{ hbGL: 90 }],
      patient: { dateOfBirth: yearsAgo(12) },
      referral: { ...clinic, plannedSurgeryDate: addDays(todayIso(), 63) },
    })
  ).referral.id
  browser = await launchBrowser()
}, 120_000)
afterAll(async () => {
  await browser?.close()
  await served?.stop()
})

const shot = async (name: string, target = page.locator('body')) => {
  if (SHOTS) await target.screenshot({ path: `${SHOTS}/${name}.png` })
}
const dialog = () => page.getByRole('dialog')

describe("an admin edits a product's own dosing table", () => {
  it("when the admin opens ferric carboxymaltose's table, then it shows the SmPC figures band by band and passes axe", async () => {
    page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 1000 } })).newPage()
    await signInThroughPage(page, served.baseUrl, admin.email, admin.password)
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
    await page.goto(`${served.baseUrl}/admin/formulary`)
    await page.getByRole('button', { name: 'Dosing table of Ferric carboxymaltose (IV)' }).click()
    // Ferinject SmPC 4.2 Table 1 (MHRA 2021): Hb <10 g/dL, 35 to <70 kg → 1,500 mg; ≥70 kg → 2,000 mg.
    await expect.poll(() => page.locator('#dt-c0-1').inputValue()).toBe('1500 mg')
    expect(await page.locator('#dt-c0-2').inputValue()).toBe('2000 mg')
    expect(await page.getByLabel('Need in mg for Hb 100 to below 140 g/L and weight 70 kg and above').inputValue()).toBe('1500 mg')
    expect(await page.getByTestId('dosing-table-caution').textContent()).toMatch(
      /Decision support.*prescribing information.*local protocols.*licensed clinician's judgement decides/s,
    )
    expect(await seriousViolations(page)).toEqual([])
    await shot('formulary-table-editor', dialog())
  }, 60_000)

  it('when a weight band leaves a gap, then saving is refused with the band named and nothing changes; the messages pass axe', async () => {
    const before = (await IronProductRow.findOne({ where: { code: 'ferric-carboxymaltose' }, raw: true }))!
    await retype(page, '#dt-w1-from', '40')
    await dialog().getByRole('button', { name: 'Save table' }).click()
    await expect
      .poll(() => page.getByTestId('dosing-table-problems').textContent())
      .toMatch(/Weight band 2: starts at 40 kg but band 1 ends below 35 kg, a gap from 35 to 40 kg/)
    expect(await page.locator('#dt-w1-from').getAttribute('aria-invalid')).toBe('true')
    expect((await IronProductRow.findOne({ where: { code: 'ferric-carboxymaltose' }, raw: true }))!.updatedAt).toEqual(before.updatedAt)
    expect(await seriousViolations(page)).toEqual([])
    await shot('formulary-table-refused', dialog())
  }, 60_000)

  it('when the admin mends the border and changes a cell with the keyboard only, then the table is saved and audited', async () => {
    await retype(page, '#dt-w1-from', '35')
    // From the first cell, Tab moves along the row: type the new need into the next cell.
    await page.locator('#dt-c1-0').focus()
    await page.keyboard.press('Tab')
    expect(await page.evaluate('document.activeElement && document.activeElement.id')).toBe('dt-c1-1')
    await page.keyboard.press('ControlOrMeta+a')
    await page.keyboard.type('1100')
    await page.keyboard.press('Tab')
    await dialog().getByRole('button', { name: 'Save table' }).focus()
    await page.keyboard.press('Enter')
    await expect
      .poll(
        async () => (await IronProductRow.findOne({ where: { code: 'ferric-carboxymaltose' }, raw: true }))!.dosingTable?.needMg[1]?.[1],
      )
      .toBe(1100)
    await expect.poll(() => dialog().count()).toBe(0)
    expect(await AuditEntry.count({ where: { entity: 'iron-product', entityId: 'ferric-carboxymaltose', action: 'update' } })).toBe(1)
    expect(await page.getByRole('row', { name: /Ferric carboxymaltose/ }).textContent()).toMatch(/Own table/)
    // Back to the label's figure for the doctor's screens below.
    await IronProductRow.update(
      {
        dosingTable: {
          weightBandsKg: [0, 35, 70],
          hbBandsGL: [0, 100, 140],
          needMg: [
            [500, 1500, 2000],
            [500, 1000, 1500],
            [500, 500, 500],
          ],
          source: 'Ferinject SmPC 4.2, Table 1 (MHRA 2021)',
        },
      },
      { where: { code: 'ferric-carboxymaltose' } },
    )
    await page.context().close()
  }, 60_000)
})

describe('an admin adds a product after editing another', () => {
  it("when the admin edits one product, cancels and presses Add, then the new product's form holds none of its caps", async () => {
    page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 1000 } })).newPage()
    await signInThroughPage(page, served.baseUrl, admin.email, admin.password)
    await page.waitForURL((u) => !u.pathname.startsWith('/sign-in'))
    await page.goto(`${served.baseUrl}/admin/formulary`)
    await page.getByRole('button', { name: 'Edit Ferric carboxymaltose (IV)' }).click()
    await expect.poll(() => page.locator('#fp-name').inputValue()).toBe('Ferric carboxymaltose (IV)')
    await dialog().getByRole('button', { name: 'Cancel' }).click()
    await expect.poll(() => dialog().count()).toBe(0)
    await page.getByRole('button', { name: 'Add a product' }).click()
    await expect.poll(() => dialog().textContent()).toMatch(/Add a product/)
    const filled = await dialog()
      .locator('input[type="text"], input:not([type]), input[inputmode], textarea')
      // Typed without the DOM library (the server's type-check reads the tests too): the fields' id and value only.
      .evaluateAll((els) =>
        (els as unknown as { id: string; value: string }[]).filter((e) => e.value !== '').map((e) => `${e.id}=${e.value}`),
      )
    expect(filled).toEqual([])
    expect(await page.locator('#fp-phosphate').isChecked()).toBe(false)
    await shot('formulary-add-after-edit', dialog())
    await page.context().close()
  }, 60_000)
})

describe('a doctor sees the product table, the timing caution and the small-patient rules on the prescription screen', () => {
  const open = async (id: number) => {
    await page.goto(`${served.baseUrl}/referrals/${id}?tab=clinic`)
    await pickOption(page, '#rx-product', 'Ferric carboxymaltose (IV)')
  }
  const text = async (testId: string) => (await page.getByTestId(testId).first().textContent()) ?? ''

  it(
    'when ferric carboxymaltose is planned 9 weeks before surgery, then the need comes from its table (Ferinject SmPC 4.2 Table 1: ' +
      '35 to <70 kg, Hb <10 g/dL → 1,500 mg) with the decision-support caution',
    async () => {
      page = await (await browser.newContext({ locale: 'en-GB', viewport: { width: 1280, height: 1600 } })).newPage()
      await signInThroughPage(page, served.baseUrl, doctor.email, doctor.password)
      await page.waitForURL(`${served.baseUrl}/clinic`)
      await open(episodes.table)
      await expect.poll(() => text('dose-deficit')).toMatch(/1500\s*mg/)
      expect(await text('dose-method')).toMatch(/Product dosing table \(Ferinject SmPC 4\.2, Table 1/)
      expect(await text('decision-support')).toMatch(
        new RegExp(
          /Decision support only: check doses.*local protocols and the product's prescribing information\. /.source +
            /The licensed clinical team decides\./.source,
        ),
      )
      await page.getByTestId('dose-plan').scrollIntoViewIfNeeded()
      await shot('rx-product-table', page.getByTestId('prescription-form'))
    },
    60_000,
  )

  it('when the first IV dose is 10 days before surgery, then the too-late caution shows', async () => {
    await open(episodes.late)
    await expect.poll(() => text('dose-timing')).toMatch(/too late to raise Hb before surgery; consider post-operative iron/)
    await shot('rx-14-day-caution', page.getByTestId('prescription-form'))
  }, 60_000)

  it(
    'when a 12-year-old of 30 kg is planned, then the table gives 500 mg (Ferinject SmPC 4.2 Table 1: below 35 kg) and the ' +
      'paediatric caps apply; the screen passes axe',
    async () => {
      await open(episodes.small)
      await expect.poll(() => text('dose-deficit')).toMatch(/500\s*mg/)
      expect(await text('dose-plan')).toMatch(/paediatric/i)
      expect(await seriousViolations(page)).toEqual([])
      await shot('rx-under-35-kg', page.getByTestId('prescription-form'))
    },
    60_000,
  )
})
