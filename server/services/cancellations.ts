import type { Sequelize } from 'sequelize'
import { Referral, SurgeryDateChange } from '../models/index'
import { isReadOnly } from '../../shared/pathway'
import type { CancelOperationInput } from '../../shared/schemas/cancellations'
import { recordAudit } from './audit'
import { loadReferral } from './episode'
import { referralDetail } from './referralDetail'
import { staleVersion, type Viewer } from './viewer'
import { RuleRefused } from '../errors'
import type { ReferralDetail } from '../../shared/pathway/views'
import { refreshEpisodeFacts } from './reports/episodeFacts'

// Once the operation is done or the episode has left the pathway there is no planned operation to cancel.
const NO_PLANNED_OPERATION = new Set(['operated', 'withdrawn', 'closed'])

/**
 * Records that the planned operation will not go ahead on its date, with why. The date stays on
 * the episode as the one that was cancelled; setting a new date (a move with its own reason)
 * rebooks it. Cancellations for anaemia are counted by the quality report.
 */
export async function cancelPlannedOperation(
  sequelize: Sequelize,
  viewer: Viewer,
  id: number,
  input: CancelOperationInput,
): Promise<ReferralDetail> {
  await sequelize.transaction(async (t) => {
    const r = await loadReferral(viewer, id, t, true)
    if (r.version !== input.version) throw staleVersion('This referral')
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    if (NO_PLANNED_OPERATION.has(r.stage)) {
      throw new RuleRefused('There is no planned operation to cancel at this stage', 'no_planned_operation', {
        reason: 'cannot be recorded once the operation is done or the episode is withdrawn',
      })
    }
    const last = await SurgeryDateChange.findOne({
      where: { referralId: id },
      order: [
        ['changedAt', 'DESC'],
        ['id', 'DESC'],
      ],
      transaction: t,
    })
    if (last?.kind === 'cancelled') {
      throw new RuleRefused('The planned operation is already cancelled; set a new surgery date to rebook it', 'already_cancelled', {
        reason: 'the operation is already cancelled',
      })
    }
    const [count] = await Referral.update({ version: input.version + 1 }, { where: { id, version: input.version }, transaction: t })
    if (count !== 1) throw staleVersion('This referral')
    const row = await SurgeryDateChange.create(
      {
        referralId: id,
        kind: 'cancelled',
        fromDate: r.plannedSurgeryDate,
        toDate: null,
        reason: input.reason,
        note: input.note ?? null,
        changedBy: viewer.userId,
        changedAt: new Date(),
      },
      { transaction: t },
    )
    await refreshEpisodeFacts(t, [id]) // a change for anaemia counts as a postponement of an operated episode
    await recordAudit(t, viewer, {
      action: 'cancel',
      entity: 'planned-operation',
      entityId: row.id,
      patientId: r.patientId,
      after: { referralId: id, plannedSurgeryDate: r.plannedSurgeryDate, reason: input.reason, note: input.note ?? null },
    })
  })
  return referralDetail(viewer, id)
}
