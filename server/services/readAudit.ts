import { Referral } from '../models/index'
import { recordAudit } from './audit'
import type { Viewer } from './viewer'

/**
 * Reading clinical data is audited like changing it. For the episode's sub-records (reviews,
 * prescriptions, doses, projection, readiness, appointments) the entry names what was read and
 * the patient it belongs to. Called after the read succeeded, so refusals are not logged as views.
 */
export async function recordEpisodeRead(viewer: Viewer, entity: string, referralId: number, entityId: number = referralId): Promise<void> {
  const r = await Referral.findByPk(referralId, { attributes: ['patientId'], raw: true })
  await recordAudit(null, viewer, { action: 'view', entity, entityId, patientId: r?.patientId ?? null })
}
