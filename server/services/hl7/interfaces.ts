import type { Sequelize } from 'sequelize'
import type { Hl7MessageDetail, Hl7Overview } from '../../../shared/hl7'
import type { Config } from '../../config'
import { RuleRefused } from '../../errors'
import { Hl7MessageRow } from '../../models/index'
import { recordAudit } from '../audit'
import type { Viewer } from '../viewer'
import { reprocess } from './inbox'
import { listenerState } from './listener'
import { attentionCount, messageDetail, outcomeCounts, perHour } from './messages'

export async function hl7Overview(sequelize: Sequelize, config: Config): Promise<Hl7Overview> {
  return {
    listener: listenerState(config),
    perHour: await perHour(sequelize),
    attention: await attentionCount(),
    ...(await outcomeCounts(sequelize)),
  }
}

/** A message holds patient data: reading it is audited like reading the episode. */
export async function readMessage(viewer: Viewer, id: number): Promise<Hl7MessageDetail> {
  const detail = await messageDetail(id)
  await recordAudit(null, viewer, { action: 'view', entity: 'hl7_message', entityId: id })
  return detail
}

/** "Process again" from the attention queue: the outcome, and who asked for it, are audited. */
export async function processAgain(sequelize: Sequelize, config: Config, viewer: Viewer, id: number): Promise<Hl7MessageDetail> {
  const row = await Hl7MessageRow.findByPk(id, { attributes: ['id', 'needsAttention'], raw: true })
  if (!row) return messageDetail(id)
  if (!row.needsAttention)
    throw new RuleRefused('This message does not need attention; only messages in the queue are processed again', 'not_in_queue')
  const out = await reprocess(sequelize, config, id)
  await recordAudit(null, viewer, { action: 'hl7-reprocess', entity: 'hl7_message', entityId: id, after: out })
  return messageDetail(id)
}
