import { allows } from '../../shared/permissions'
import type { EpisodeUpdates } from '../../shared/pathway/views'
import type { Viewer } from './viewer'
import { referralDetail } from './referralDetail'
import { listReferralAppointments } from './appointments'
import { listOutbox } from './outbox'

/**
 * The parts of an open episode that colleagues, patients' replies and the e-mail worker change
 * while it is on screen: the episode itself, its appointments and the messages to the patient.
 * Read and audited as each part's own route reads them; the detail is read first, so an unknown
 * episode or another surgeon's patient is refused before anything else is read.
 */
export async function episodeUpdates(viewer: Viewer, referralId: number): Promise<EpisodeUpdates> {
  const detail = await referralDetail(viewer, referralId, { audit: true })
  const [appointments, messages] = await Promise.all([
    listReferralAppointments(viewer, referralId),
    allows(viewer.role, 'outbox.read') ? listOutbox({ referralId }) : Promise.resolve(null),
  ])
  return { detail, appointments, messages }
}
