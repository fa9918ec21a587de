import { DataTypes, QueryTypes, type QueryInterface } from 'sequelize'
import { ironResponse, type TreatmentGiven } from '../../shared/clinic/evidence'
import { clinicTimeZone } from '../services/clinicDay'

/**
 * Two worklist flags kept on the referral row, like the screening outcome: no response to IV
 * iron and Hb falling after iron. Indexed with the surgery date so a filter on either reads an
 * index range. Episodes already treated are filled in here from their doses and Hb results,
 * read on the clinic calendar (CLINIC_TIME_ZONE once the app is configured, London otherwise;
 * the zone only matters for a sample taken within an hour of midnight).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('referrals', 'no_response_to_iron', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
  await qi.addColumn('referrals', 'hb_falling_after_iron', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
  await qi.addIndex('referrals', ['no_response_to_iron', 'planned_surgery_date'], { name: 'referrals_no_response_to_iron' })
  await qi.addIndex('referrals', ['hb_falling_after_iron', 'planned_surgery_date'], { name: 'referrals_hb_falling_after_iron' })

  const q = qi.sequelize
  const doses = await q.query<{ referralId: number; givenAt: Date; doseMg: number; route: 'iv' | 'oral' }>(
    `SELECT a.referral_id AS referralId, a.given_at AS givenAt, a.dose_mg AS doseMg, p.route
     FROM administrations a JOIN prescriptions p ON p.id = a.prescription_id ORDER BY a.referral_id, a.given_at, a.id`,
    { type: QueryTypes.SELECT },
  )
  const byReferral = new Map<number, typeof doses>()
  for (const d of doses) byReferral.set(d.referralId, [...(byReferral.get(d.referralId) ?? []), d])
  const zone = clinicTimeZone()
  for (const [referralId, list] of byReferral) {
    const hb = await q.query<{ takenAt: Date; hbGL: number }>(
      `SELECT taken_at AS takenAt, value_canonical AS hbGL FROM results WHERE referral_id = :referralId AND analyte = 'hb'
       AND voided_at IS NULL AND comparator IS NULL AND status <> 'preliminary' ORDER BY taken_at, id`,
      { type: QueryTypes.SELECT, replacements: { referralId } },
    )
    const treatment: TreatmentGiven = {
      kind: list[0]!.route,
      firstDoseAt: list[0]!.givenAt,
      lastDoseAt: list[list.length - 1]!.givenAt,
      totalMg: list.reduce((s, d) => s + Number(d.doseMg), 0),
      deficitMg: null,
    }
    const r = ironResponse(
      hb.map((h) => ({ takenAt: h.takenAt, hbGL: Number(h.hbGL) })),
      treatment,
      zone,
    )
    if (r.nonResponse || r.falling) {
      await q.query('UPDATE referrals SET no_response_to_iron = :nr, hb_falling_after_iron = :fa WHERE id = :referralId', {
        type: QueryTypes.UPDATE,
        replacements: { nr: r.nonResponse ? 1 : 0, fa: r.falling ? 1 : 0, referralId },
      })
    }
  }
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('referrals', 'referrals_hb_falling_after_iron')
  await qi.removeIndex('referrals', 'referrals_no_response_to_iron')
  await qi.removeColumn('referrals', 'hb_falling_after_iron')
  await qi.removeColumn('referrals', 'no_response_to_iron')
}
