import type { Sequelize, Transaction } from 'sequelize'
import { Outcome, Referral, StageTransition } from '../models/index'
import { STAGE_LABELS, allowedMoves, findMove, isReadOnly, type Stage } from '../../shared/pathway'
import type { TransitionInput } from '../../shared/schemas/referrals'
import { recordAudit } from './audit'
import { referralDetail } from './referralDetail'
import { assertMaySeeReferral, staleVersion, type Viewer } from './viewer'
import { Forbidden, NotFound, RuleRefused } from '../errors'
import { worklistChanged } from './worklistCounts'
import { refreshMilestones } from './reports/referralMilestones'
import type { ReferralDetail } from '../../shared/pathway/views'

/**
 * Moves an episode to another stage, enforcing the pathway table in shared/pathway. The checks
 * run in this order so each answer is the most useful one: a stale version first (what you saw
 * is no longer true), then a read-only episode, a move the pathway does not have, a role that
 * may not make it, a missing reason, a missing result, and a missing follow-up after surgery.
 */
export async function moveReferral(sequelize: Sequelize, viewer: Viewer, id: number, input: TransitionInput): Promise<ReferralDetail> {
  const to = input.to as Stage
  const reason = input.reason ?? null
  await sequelize.transaction(async (t) => {
    // Locked so a result arriving at the same moment cannot interleave with the move.
    const r = await Referral.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!r) throw new NotFound('Referral')
    assertMaySeeReferral(viewer, r.surgeonId)
    if (r.version !== input.version) throw staleVersion('This referral')
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const move = findMove(r.stage, to)
    if (!move) {
      const options = allowedMoves(r.stage, viewer.role).map((m) => m.to)
      throw new RuleRefused(
        `An episode cannot move from "${STAGE_LABELS[r.stage]}" to ` +
          `"${STAGE_LABELS[to]}"${options.length ? ` (you may move it to: ${options.join(', ')})` : ''}`,
        'move_not_allowed',
      )
    }
    if (!move.roles.includes(viewer.role)) {
      throw new Forbidden(`Only ${move.roles.join(' or ')} may move an episode from ${r.stage} to ${to}`, 'move_forbidden')
    }
    if (move.requiresReason && !reason) {
      throw new RuleRefused(`A reason is required to move an episode to "${STAGE_LABELS[to]}"`, 'reason_required', {
        reason: 'is required for this move',
      })
    }
    if (move.requires === 'hb-result' && r.latestHbAt == null) {
      throw new RuleRefused('Screening needs at least an Hb result; enter one first', 'hb_result_required')
    }
    if (move.requires === 'follow-up') await assertFollowUpRecorded(t, r.id)
    await recordMove(t, viewer, r, to, reason)
  })
  return referralDetail(viewer, id)
}

/** An episode after surgery closes only once what happened and the check after discharge are both on record. */
async function assertFollowUpRecorded(t: Transaction, referralId: number): Promise<void> {
  const o = await Outcome.findOne({ where: { referralId }, attributes: ['id', 'followUpAt'], transaction: t })
  if (!o) {
    throw new RuleRefused(
      'Before closing, record the post-operative outcome and then the follow-up after discharge',
      'follow_up_required',
      {
        outcome: 'is not recorded yet',
        followUp: 'is not recorded yet',
      },
    )
  }
  if (o.followUpAt == null) {
    throw new RuleRefused(
      'Before closing, record the follow-up after discharge (Hb re-check and whether iron is needed)',
      'follow_up_required',
      {
        followUp: 'is not recorded yet',
      },
    )
  }
}

/**
 * Writes one stage move (new stage and version, the transition row, the audit entry) inside the
 * caller's transaction, on a referral row the caller has locked. Rule checks are the caller's:
 * moveReferral checks the pathway table; a recorded iron dose moves the episode to treating.
 */
export async function recordMove(t: Transaction, viewer: Viewer, r: Referral, to: Stage, reason: string | null): Promise<number> {
  worklistChanged('referral', t)
  const [count] = await Referral.update({ stage: to, version: r.version + 1 }, { where: { id: r.id, version: r.version }, transaction: t })
  if (count !== 1) throw staleVersion('This referral')
  const row = await StageTransition.create(
    { referralId: r.id, fromStage: r.stage, toStage: to, reason, userId: viewer.userId },
    { transaction: t },
  )
  await refreshMilestones(t, [r.id]) // cleared, operated and the first move to clinic (funnel, waiting times)
  await recordAudit(t, viewer, {
    action: 'transition',
    entity: 'referral',
    entityId: r.id,
    patientId: r.patientId,
    before: { stage: r.stage, version: r.version },
    after: { stage: to, version: r.version + 1, reason, transitionId: row.id },
  })
  return r.version + 1
}
