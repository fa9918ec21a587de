import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import { FLAG_SQL, flagParams } from '../../server/services/worklistFilter'
import { WORKLIST_FLAGS, addDays, referralFlags, type FlagInput, type WorklistFlag } from '../../shared/pathway'

/**
 * The worklist filters flags in SQL over the referral row (FLAG_SQL), and labels each row with
 * the pure rule (referralFlags in shared/pathway/flags.ts). Here both read the same cases, built
 * on each rule's edges, in the same clinic zone on the same day: any drift fails by name.
 */
let t: TestApp
const ZONE = 'Europe/London'
const TODAY = '2027-07-20'
// Summer time: the zone is UTC+1, so an instant near midnight UTC falls on the next clinic day.
const NOW = new Date('2027-07-20T12:00:00Z')
const d = (n: number) => addDays(TODAY, n)

const base: FlagInput = {
  stage: 'clinic',
  plannedSurgeryDate: d(60),
  anaemic: false,
  latestHbAt: '2027-07-10T09:00:00Z',
  recheckDueDate: null,
  treatmentOrderedAt: null,
  treatmentGivenAt: null,
  dateChangeRequestedAt: null,
  noResponseToIron: false,
  hbFallingAfterIron: false,
}
const CASES: Record<string, Partial<FlagInput>> = {
  'anaemic, surgery in 28 days (NATA window edge)': { anaemic: true, plannedSurgeryDate: d(28) },
  'anaemic, surgery in 29 days': { anaemic: true, plannedSurgeryDate: d(29) },
  'anaemic, surgery today': { anaemic: true, plannedSurgeryDate: d(0) },
  'anaemic, surgery date passed': { anaemic: true, plannedSurgeryDate: d(-1) },
  'not yet screened, surgery soon': { anaemic: null, latestHbAt: null, plannedSurgeryDate: d(5) },
  'operated, every condition met': {
    stage: 'operated',
    anaemic: true,
    plannedSurgeryDate: d(0),
    latestHbAt: null,
    treatmentOrderedAt: '2027-07-01T09:00:00Z',
    dateChangeRequestedAt: '2027-07-02T09:00:00Z',
    noResponseToIron: true,
    hbFallingAfterIron: true,
  },
  'treating, re-check due yesterday, Hb before it': { stage: 'treating', recheckDueDate: d(-1) },
  'treating, re-check due today': { stage: 'treating', recheckDueDate: d(0), latestHbAt: null },
  'recheck, due on the 15th, Hb 00:30 clinic time on the 15th': {
    stage: 'recheck',
    recheckDueDate: '2027-07-15',
    latestHbAt: '2027-07-14T23:30:00Z',
  },
  'recheck, due on the 15th, Hb 23:30 clinic time on the 14th': {
    stage: 'recheck',
    recheckDueDate: '2027-07-15',
    latestHbAt: '2027-07-14T22:30:00Z',
  },
  'recheck, due on the 15th, no Hb at all': { stage: 'recheck', recheckDueDate: '2027-07-15', latestHbAt: null },
  'clinic stage with a past re-check date': { stage: 'clinic', recheckDueDate: d(-5) },
  'treatment ordered, not given': { treatmentOrderedAt: '2027-07-01T09:00:00Z' },
  'treatment ordered and given': { treatmentOrderedAt: '2027-07-01T09:00:00Z', treatmentGivenAt: '2027-07-03T09:00:00Z' },
  'surgeon asked to move the date': { dateChangeRequestedAt: '2027-07-02T09:00:00Z' },
  'no response to IV iron and Hb falling': { stage: 'recheck', noResponseToIron: true, hbFallingAfterIron: true },
  'cleared, no response kept on the row': { stage: 'cleared', noResponseToIron: true },
}

/** An instant as MariaDB stores it (UTC, the connection's zone), or null. */
const utc = (v: Date | string | null | undefined) => (v == null ? null : new Date(v).toISOString().slice(0, 19).replace('T', ' '))
const bit = (v: boolean | number | null | undefined) => (v == null ? null : v ? 1 : 0)

async function sqlFlags(c: FlagInput): Promise<WorklistFlag[]> {
  const cols = WORKLIST_FLAGS.map((f, i) => `${FLAG_SQL[f]} AS f${i}`).join(', ')
  const row = `SELECT :stage AS stage, CAST(:psd AS DATE) AS planned_surgery_date, :anaemic AS anaemic,
    CAST(:hbAt AS DATETIME) AS latest_hb_at,
    CAST(:recheck AS DATE) AS recheck_due_date, CAST(:ordered AS DATETIME) AS treatment_ordered_at,
      CAST(:given AS DATETIME) AS treatment_given_at,
    CAST(:moveAsked AS DATETIME) AS date_change_requested_at, :noResponse AS no_response_to_iron, :falling AS hb_falling_after_iron`
  const [out] = await t.sequelize.query<Record<string, number | null>>(`SELECT ${cols} FROM (${row}) r`, {
    type: QueryTypes.SELECT,
    replacements: {
      ...flagParams(TODAY, ZONE, NOW),
      stage: c.stage,
      psd: c.plannedSurgeryDate,
      anaemic: bit(c.anaemic),
      hbAt: utc(c.latestHbAt),
      recheck: c.recheckDueDate,
      ordered: utc(c.treatmentOrderedAt),
      given: utc(c.treatmentGivenAt),
      moveAsked: utc(c.dateChangeRequestedAt),
      noResponse: bit(c.noResponseToIron),
      falling: bit(c.hbFallingAfterIron),
    },
  })
  return WORKLIST_FLAGS.filter((_, i) => Number(out![`f${i}`]) === 1)
}

beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})

describe('the worklist filter SQL and the flag rule on the same cases', () => {
  it('when each edge case is read by the filter SQL and by the flag rule, then both raise the same flags', async () => {
    const disagree: string[] = []
    for (const [name, c] of Object.entries(CASES)) {
      const [sql, rule] = [await sqlFlags({ ...base, ...c }), referralFlags({ ...base, ...c }, TODAY, ZONE)]
      if (sql.join() !== rule.join()) disagree.push(`${name}: SQL [${sql.join()}] rule [${rule.join()}]`)
    }
    expect(disagree).toEqual([])
  })

  it('when the cases are read by the rule, then every flag is both raised and not raised somewhere (no case set passes vacuously)', () => {
    const raised = Object.values(CASES).map((c) => referralFlags({ ...base, ...c }, TODAY, ZONE))
    for (const flag of WORKLIST_FLAGS) {
      expect(
        raised.some((r) => r.includes(flag)),
        flag,
      ).toBe(true)
      expect(
        raised.some((r) => !r.includes(flag)),
        flag,
      ).toBe(true)
    }
    // The edges themselves, as the rule states them: 28 days in (NATA, Goodnough 2011), the Hb's clinic-calendar day.
    expect(referralFlags({ ...base, ...CASES['anaemic, surgery in 28 days (NATA window edge)'] }, TODAY, ZONE)).toContain(
      'surgery-soon-anaemic',
    )
    expect(referralFlags({ ...base, ...CASES['anaemic, surgery in 29 days'] }, TODAY, ZONE)).not.toContain('surgery-soon-anaemic')
    expect(referralFlags({ ...base, ...CASES['recheck, due on the 15th, Hb 00:30 clinic time on the 15th'] }, TODAY, ZONE)).not.toContain(
      'recheck-overdue',
    )
    expect(referralFlags({ ...base, ...CASES['recheck, due on the 15th, Hb 23:30 clinic time on the 14th'] }, TODAY, ZONE)).toContain(
      'recheck-overdue',
    )
  })
})
