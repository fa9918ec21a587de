import { QueryTypes, type Sequelize } from 'sequelize'
import { Administration, Outcome, Prescription, Result, SurgeryDateChange, Transfusion } from '../../server/models/index'
import { rebuildEpisodeFacts } from '../../server/services/reports/episodeFacts'
import { rebuildMilestones } from '../../server/services/reports/referralMilestones'

/**
 * Fixtures that write straight to the tables (not through the services, which keep the reports' pre-aggregates
 * in their own transactions) then build them from scratch, as ops do after hand-written data
 * (`npm run db:episode-facts`): the quality report's episode facts and the funnel's referral milestones.
 */
export async function factsAfterHandWrites(): Promise<number> {
  const n = await rebuildEpisodeFacts(Outcome.sequelize!)
  await rebuildMilestones(Outcome.sequelize!)
  return n
}

/** One operated episode's facts, as episode_facts (migration 0026) holds them. */
export interface EpisodeFacts {
  surgeryDate: string
  firstHbAt: string | null
  firstHbGL: number | null
  surgeryDayHbGL: number | null
  screened28: number
  screened1445: number
  ironBefore: number
  ironPrescribed: number
  postponementsForAnaemia: number
  rbcRows: number
  rbcUnits: number
  rbcSingle: number
  rbcReassessed: number
  anyTransfusions: number
  informationOnTransfusion: number
}

const DAY = 86_400_000
const bit = (b: boolean) => (b ? 1 : 0)

/**
 * Each operated episode's facts worked out from the raw rows in plain TypeScript, one episode at a time,
 * without the SQL that fills the table: the counted Hb (not voided, not preliminary) sorted by time then id;
 * the surgery day in UTC as the database keeps it.
 */
export async function factsFromScratch(): Promise<Map<number, EpisodeFacts>> {
  const [outcomes, results, doses, prescriptions, changes, transfusions] = await Promise.all([
    Outcome.findAll({ raw: true }),
    Result.findAll({ where: { analyte: 'hb' }, raw: true }),
    Administration.findAll({ raw: true }),
    Prescription.findAll({ raw: true }),
    SurgeryDateChange.findAll({ raw: true }),
    Transfusion.findAll({ raw: true }),
  ])
  const out = new Map<number, EpisodeFacts>()
  for (const o of outcomes) {
    const id = o.referralId
    const s = new Date(`${String(o.surgeryDate)}T00:00:00.000Z`).getTime()
    const hb = results
      .filter((h) => h.referralId === id && h.voidedAt === null && h.status !== 'preliminary')
      .sort((a, b) => a.takenAt.getTime() - b.takenAt.getTime() || a.id - b.id)
    const onOrBefore = hb.filter((h) => h.takenAt.getTime() < s + DAY)
    const tx = transfusions.filter((x) => x.referralId === id && x.voidedAt === null)
    const red = tx.filter((x) => x.component === 'red-cells')
    out.set(id, {
      surgeryDate: String(o.surgeryDate),
      firstHbAt: hb[0] ? hb[0].takenAt.toISOString() : null,
      firstHbGL: hb[0]?.valueCanonical ?? null,
      surgeryDayHbGL: onOrBefore.at(-1)?.valueCanonical ?? null,
      // DATEDIFF counts calendar days: an Hb on the 28th day before surgery, at any hour, is 28 days before.
      screened28: bit(hb.some((h) => h.takenAt.getTime() < s - 27 * DAY)),
      screened1445: bit(hb.some((h) => h.takenAt.getTime() >= s - 45 * DAY && h.takenAt.getTime() < s - 13 * DAY)),
      ironBefore: bit(doses.some((d) => d.referralId === id && d.givenAt.getTime() < s + DAY)),
      ironPrescribed: bit(prescriptions.some((p) => p.referralId === id)),
      postponementsForAnaemia: changes.filter((c) => c.referralId === id && c.reason === 'anaemia').length,
      rbcRows: red.length,
      rbcUnits: red.reduce((n, x) => n + x.units, 0),
      rbcSingle: red.filter((x) => x.units === 1).length,
      rbcReassessed: red.filter((x) => x.units === 1 && Boolean(x.reassessedBeforeNext) && x.postTransfusionHbGL !== null).length,
      anyTransfusions: tx.length,
      informationOnTransfusion: bit(tx.some((x) => Boolean(x.informationGiven))),
    })
  }
  return out
}

/** What episode_facts holds now, in the same shape. */
export async function storedFacts(sequelize: Sequelize): Promise<Map<number, EpisodeFacts>> {
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT referral_id, DATE_FORMAT(surgery_date, '%Y-%m-%d') AS surgery_date, first_hb_at, first_hb_gl, surgery_day_hb_gl,
      screened_28_days_before, screened_14_45_days_before, iron_before_surgery, iron_prescribed, postponements_for_anaemia,
      rbc_rows, rbc_units, rbc_single, rbc_reassessed, any_transfusions, information_on_transfusion FROM episode_facts`,
    { type: QueryTypes.SELECT },
  )
  const n = (v: unknown) => Number(v)
  const orNull = (v: unknown) => (v === null ? null : Number(v))
  return new Map(
    rows.map((r) => [
      n(r.referral_id),
      {
        surgeryDate: String(r.surgery_date),
        firstHbAt: r.first_hb_at === null ? null : new Date(r.first_hb_at as string | Date).toISOString(),
        firstHbGL: orNull(r.first_hb_gl),
        surgeryDayHbGL: orNull(r.surgery_day_hb_gl),
        screened28: n(r.screened_28_days_before),
        screened1445: n(r.screened_14_45_days_before),
        ironBefore: n(r.iron_before_surgery),
        ironPrescribed: n(r.iron_prescribed),
        postponementsForAnaemia: n(r.postponements_for_anaemia),
        rbcRows: n(r.rbc_rows),
        rbcUnits: n(r.rbc_units),
        rbcSingle: n(r.rbc_single),
        rbcReassessed: n(r.rbc_reassessed),
        anyTransfusions: n(r.any_transfusions),
        informationOnTransfusion: n(r.information_on_transfusion),
      },
    ]),
  )
}
