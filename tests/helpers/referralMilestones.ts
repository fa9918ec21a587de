import { QueryTypes, type Sequelize } from 'sequelize'
import { Administration, Outcome, Prescription, Referral, Result, StageTransition } from '../../server/models/index'

/** One referral's milestones, as referral_milestones (migration 0027) holds them. */
export interface Milestones {
  firstHbAt: string | null
  lastHbAt: string | null
  firstDoseAt: string | null
  prescribed: number
  cleared: number
  operated: number
  clinicAt: string | null
  surgeryDate: string | null
}

const iso = (d: Date | undefined) => (d ? d.toISOString() : null)
const bit = (b: boolean) => (b ? 1 : 0)

/**
 * Each referral's milestones worked out from the raw rows in plain TypeScript, without the SQL that fills the
 * table: counted Hb (not voided, not preliminary), doses, prescriptions, moves to clinic / cleared / operated and
 * the post-operative record. A referral with none of them has no entry, as it has no row.
 */
export async function milestonesFromScratch(): Promise<Map<number, Milestones>> {
  const [referrals, results, doses, prescriptions, moves, outcomes] = await Promise.all([
    Referral.findAll({ attributes: ['id'], raw: true }),
    Result.findAll({ where: { analyte: 'hb' }, raw: true }),
    Administration.findAll({ raw: true }),
    Prescription.findAll({ raw: true }),
    StageTransition.findAll({ raw: true }),
    Outcome.findAll({ raw: true }),
  ])
  const out = new Map<number, Milestones>()
  for (const { id } of referrals) {
    const hb = results
      .filter((h) => h.referralId === id && h.voidedAt === null && h.status !== 'preliminary')
      .map((h) => h.takenAt)
      .sort((a, b) => a.getTime() - b.getTime())
    const given = doses
      .filter((d) => d.referralId === id)
      .map((d) => d.givenAt)
      .sort((a, b) => a.getTime() - b.getTime())
    const own = moves.filter((m) => m.referralId === id)
    const clinic = own
      .filter((m) => m.toStage === 'clinic')
      .map((m) => m.at)
      .sort((a, b) => a.getTime() - b.getTime())
    const outcome = outcomes.find((o) => o.referralId === id)
    const m: Milestones = {
      firstHbAt: iso(hb[0]),
      lastHbAt: iso(hb.at(-1)),
      firstDoseAt: iso(given[0]),
      prescribed: bit(prescriptions.some((p) => p.referralId === id)),
      cleared: bit(own.some((x) => x.toStage === 'cleared')),
      operated: bit(own.some((x) => x.toStage === 'operated')),
      clinicAt: iso(clinic[0]),
      surgeryDate: outcome ? String(outcome.surgeryDate) : null,
    }
    if (Object.values(m).some((v) => v !== null && v !== 0)) out.set(id, m)
  }
  return out
}

/** What referral_milestones holds now, in the same shape. */
export async function storedMilestones(sequelize: Sequelize): Promise<Map<number, Milestones>> {
  const rows = await sequelize.query<Record<string, unknown>>(
    `SELECT referral_id, first_hb_at, last_hb_at, first_dose_at, prescribed, cleared, operated, clinic_at,
      DATE_FORMAT(surgery_date, '%Y-%m-%d') AS surgery_date FROM referral_milestones`,
    { type: QueryTypes.SELECT },
  )
  const at = (v: unknown) => (v === null ? null : new Date(v as string | Date).toISOString())
  return new Map(
    rows.map((r) => [
      Number(r.referral_id),
      {
        firstHbAt: at(r.first_hb_at),
        lastHbAt: at(r.last_hb_at),
        firstDoseAt: at(r.first_dose_at),
        prescribed: Number(r.prescribed),
        cleared: Number(r.cleared),
        operated: Number(r.operated),
        clinicAt: at(r.clinic_at),
        surgeryDate: r.surgery_date === null ? null : String(r.surgery_date),
      },
    ]),
  )
}
