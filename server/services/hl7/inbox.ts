import { Hl7Message } from '@medplum/core'
import { UniqueConstraintError, type Sequelize, type Transaction } from 'sequelize'
import type { Hl7Outcome } from '../../../shared/hl7'
import type { Config } from '../../config'
import { Hl7MessageRow } from '../../models/index'
import { codesFor } from '../imports/mappings'
import type { Actor } from '../audit'
import { buildAck, Hl7Problem, type AckCode } from './ack'
import { readOru } from './oruRead'
import { storeOru } from './oruStore'
import { storeSiu } from './siu'
import { storeAdt } from './adt'
import { checkHeader, mrnOf, readHeader, type Header, type Incoming } from './header'
import { storeOruBatch } from './oruBatch'
import { unitOfWork } from '../../unitOfWork'
import type { Hl7Change } from '../../../shared/hl7'

/** What a message asks of Ferrolane, done inside `t`; throws Hl7Problem when it cannot be done. */
async function apply(
  sequelize: Sequelize,
  config: Config,
  msg: Hl7Message,
  h: Header,
  messageId: number,
  t: Transaction,
): Promise<Hl7Change[]> {
  const actor: Actor = { userId: null, requestId: `hl7:${messageId}`, ip: null }
  if (h.type === 'ORU^R01') {
    // Local codes are the laboratory's own: the CSV import's saved mapping for that source (MSH-4).
    const codes = await codesFor(h.sendingFacility || h.sendingApp)
    const groups = readOru(msg, { authority: config.hl7.assigningAuthority, codes, timeZone: config.clinic.timeZone, now: Date.now() })
    return storeOru(sequelize, groups, { messageId, controlId: h.controlId, actor }, t)
  }
  if (h.type.startsWith('SIU^')) return storeSiu(config, msg, h.type.slice(4), { messageId, controlId: h.controlId, actor }, t)
  return storeAdt(config, msg, { messageId, actor }, t)
}

/**
 * One message in, one ACK out (a batch of one: see receiveBatch). Throws when the message could
 * not be processed at all (nothing of it was stored).
 */
export async function receive(sequelize: Sequelize, config: Config, msg: Hl7Message): Promise<string> {
  const [outcome] = await receiveBatch(sequelize, config, [msg])
  if (outcome!.status === 'rejected') throw outcome!.reason
  return outcome!.value
}

/**
 * Messages in, their ACKs out, in order; all stored in one transaction (group commit: one commit
 * and one log flush for the batch). Plain results take the batch path (oruBatch.ts: a few
 * statements for the whole batch); otherwise each message is behind its own savepoint, so one that cannot
 * be applied (AE, AR) is rolled back alone and kept with its reason while the others are stored.
 * A control id already answered gets that answer again and changes nothing; a message row and
 * everything it changes are stored together or not at all. The ACKs exist only once the
 * transaction has committed. A deadlock replays the batch (unitOfWork); any other failure rolls
 * it back and each message is stored again alone the per-message way (`batchPath` false: a control
 * id or result another node stored meanwhile is then found behind its savepoint), so only the one
 * that fails gets an error.
 */
export async function receiveBatch(
  sequelize: Sequelize,
  config: Config,
  msgs: Hl7Message[],
  batchPath = true,
): Promise<PromiseSettledResult<string>[]> {
  const incoming = msgs.map((msg): Incoming => ({ msg, h: readHeader(msg), raw: msg.toString(), receivedAt: new Date() }))
  try {
    const acks = await unitOfWork(sequelize, { idempotent: true }, async (t) => {
      // Plain results: a few statements for the whole batch. Anything else: one message at a time below.
      const fast = batchPath ? await storeOruBatch(sequelize, config, incoming, t) : null
      if (fast) return fast
      const out: string[] = []
      for (const [i, m] of incoming.entries()) out.push(await storeInBatch(sequelize, config, m, i, t))
      return out
    })
    return acks.map((value) => ({ status: 'fulfilled', value }))
  } catch (err) {
    if (msgs.length === 1 && !batchPath) return [{ status: 'rejected', reason: err }]
    const out: PromiseSettledResult<string>[] = []
    for (const msg of msgs) out.push(...(await receiveBatch(sequelize, config, [msg], false)))
    return out
  }
}

async function storeInBatch(sequelize: Sequelize, config: Config, m: Incoming, n: number, t: Transaction): Promise<string> {
  const { msg, h, raw, receivedAt } = m
  try {
    checkHeader(h)
  } catch (err) {
    const problem = err as Hl7Problem
    if (!h.controlId) return buildAck(msg, 'AR', problem)
    return record(m, 'rejected', 'AR', problem, t)
  }
  // A control id already answered is found by the unique key when its row is inserted: no
  // separate look-up for every new message.
  const savepoint = `hl7_message_${n}`
  await sequelize.query(`SAVEPOINT ${savepoint}`, { transaction: t })
  try {
    const row = await Hl7MessageRow.create(
      {
        receivedAt,
        controlId: h.controlId,
        sendingApp: h.sendingApp,
        sendingFacility: h.sendingFacility,
        messageType: h.type,
        version: h.version,
        raw,
        outcome: 'stored',
        ackCode: 'AA',
        ack: '',
        errorCode: null,
        errorText: null,
        changes: null,
        patientMrn: mrnOf(msg),
        needsAttention: false,
        processedAt: receivedAt,
      },
      { transaction: t },
    )
    const changes = await apply(sequelize, config, msg, h, row.id, t)
    const ack = buildAck(msg, 'AA')
    await row.update({ outcome: changes.length ? 'stored' : 'nothing-new', ack, changes, processedAt: new Date() }, { transaction: t })
    return ack
  } catch (err) {
    if (!(err instanceof UniqueConstraintError) && !(err instanceof Hl7Problem)) throw err
    await sequelize.query(`ROLLBACK TO SAVEPOINT ${savepoint}`, { transaction: t })
    if (err instanceof Hl7Problem) return record(m, err.ack === 'AE' ? 'error' : 'rejected', err.ack, err, t)
    const earlier = await answered(h, t)
    if (earlier === null) throw err // another unique key (a result's): the batch is stored again without it
    return earlier
  }
}

/**
 * The ACK already given to this sender's control id: in this batch (the transaction's own rows)
 * or committed by another transaction since this one began (a fresh read outside it).
 */
async function answered(h: Header, t: Transaction): Promise<string | null> {
  const where = { sendingApp: h.sendingApp, sendingFacility: h.sendingFacility, controlId: h.controlId }
  const row =
    (await Hl7MessageRow.findOne({ where, attributes: ['ack'], raw: true, transaction: t })) ??
    (await Hl7MessageRow.findOne({ where, attributes: ['ack'], raw: true }))
  return row?.ack ?? null
}

async function record(m: Incoming, outcome: Hl7Outcome, code: AckCode, problem: Hl7Problem, t: Transaction): Promise<string> {
  const { msg, h, raw, receivedAt } = m
  const ack = buildAck(msg, code, problem)
  try {
    await Hl7MessageRow.create(
      {
        receivedAt,
        controlId: h.controlId,
        sendingApp: h.sendingApp,
        sendingFacility: h.sendingFacility,
        messageType: h.type,
        version: h.version,
        raw,
        outcome,
        ackCode: code,
        ack,
        errorCode: problem.code,
        errorText: problem.message.slice(0, 1000),
        changes: null,
        patientMrn: mrnOf(msg),
        needsAttention: code === 'AE',
        processedAt: new Date(),
      },
      { transaction: t },
    )
    return ack
  } catch (err) {
    // The same control id arrived twice: the first one's answer stands (a failed INSERT undoes only itself).
    if (err instanceof UniqueConstraintError) return (await answered(h, t)) ?? ack
    throw err
  }
}

/**
 * "Process again" for a message in the attention queue, once its cause is fixed (the patient is
 * registered, the code mapped): the same rules, in one transaction with the row's new outcome.
 */
export async function reprocess(
  sequelize: Sequelize,
  config: Config,
  id: number,
): Promise<{ outcome: Hl7Outcome; errorText: string | null }> {
  return sequelize.transaction(async (t) => {
    const row = await Hl7MessageRow.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!row || !row.needsAttention)
      return { outcome: row?.outcome ?? 'rejected', errorText: row ? 'this message does not need attention' : 'no such message' }
    const msg = Hl7Message.parse(row.raw)
    const h = readHeader(msg)
    try {
      const changes = await sequelize.transaction({ transaction: t }, (inner) => apply(sequelize, config, msg, h, row.id, inner))
      const ack = buildAck(msg, 'AA')
      await row.update(
        {
          outcome: changes.length ? 'stored' : 'nothing-new',
          ackCode: 'AA',
          ack,
          changes,
          errorCode: null,
          errorText: null,
          needsAttention: false,
          attempts: row.attempts + 1,
          processedAt: new Date(),
        },
        { transaction: t },
      )
      return { outcome: row.outcome, errorText: null }
    } catch (err) {
      if (!(err instanceof Hl7Problem)) throw err
      await row.update(
        { errorCode: err.code, errorText: err.message.slice(0, 1000), attempts: row.attempts + 1, processedAt: new Date() },
        { transaction: t },
      )
      return { outcome: row.outcome, errorText: err.message }
    }
  })
}
