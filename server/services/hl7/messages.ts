import { Op, QueryTypes, type Sequelize, type WhereOptions } from 'sequelize'
import { Hl7Message } from '@medplum/core'
import type { Hl7MessageDetail, Hl7MessagePage, Hl7MessageSummary, Hl7Outcome, Hl7Overview } from '../../../shared/hl7'
import { Hl7MessageRow } from '../../models/index'
import { NotFound } from '../../errors'
import { isoOrNull } from '../viewer'

function summary(r: Hl7MessageRow): Hl7MessageSummary {
  return {
    id: r.id,
    receivedAt: isoOrNull(r.receivedAt)!,
    controlId: r.controlId,
    sender: [r.sendingApp, r.sendingFacility].filter(Boolean).join(' / '),
    messageType: r.messageType,
    version: r.version,
    outcome: r.outcome,
    ackCode: r.ackCode,
    errorCode: r.errorCode,
    errorText: r.errorText,
    patientMrn: r.patientMrn,
    needsAttention: Boolean(r.needsAttention),
    attempts: r.attempts,
  }
}

export interface MessageQuery {
  q?: string
  outcome?: Hl7Outcome
  type?: string
  attention?: boolean
  limit: number
  offset: number
}

/** What a reader without a clinical role gets: no hospital number, no error text (it may name the patient). */
function withoutPatient(s: Hl7MessageSummary): Hl7MessageSummary {
  return { ...s, patientMrn: null, errorText: null }
}

/**
 * Messages newest first. With `patientDetail`, `q` finds a control id, an MRN or any text of
 * the raw message; without it, a control id only, so a search cannot tell who has a message.
 */
export async function listMessages(query: MessageQuery, patientDetail: boolean): Promise<Hl7MessagePage> {
  const where: WhereOptions[] = []
  if (query.q && !patientDetail) where.push({ controlId: query.q })
  else if (query.q) {
    const like = `%${query.q.replace(/[\\%_]/g, (c) => `\\${c}`)}%`
    where.push({ [Op.or]: [{ controlId: query.q }, { patientMrn: query.q }, { raw: { [Op.like]: like } }] })
  }
  if (query.outcome) where.push({ outcome: query.outcome })
  if (query.type) where.push({ messageType: query.type })
  if (query.attention !== undefined) where.push({ needsAttention: query.attention })
  const { rows, count } = await Hl7MessageRow.findAndCountAll({
    where: { [Op.and]: where },
    order: [
      ['receivedAt', 'DESC'],
      ['id', 'DESC'],
    ],
    limit: query.limit,
    offset: query.offset,
    attributes: { exclude: ['raw', 'ack', 'changes'] },
  })
  const items = rows.map(summary)
  return { items: patientDetail ? items : items.map(withoutPatient), total: count, patientDetail }
}

export async function messageDetail(id: number): Promise<Hl7MessageDetail> {
  const r = await Hl7MessageRow.findByPk(id)
  if (!r) throw new NotFound('HL7 message')
  let segments: Hl7MessageDetail['segments']
  try {
    segments = Hl7Message.parse(r.raw).segments.map((s) => {
      const fields = s.fields.slice(1).map((f) => f.toString())
      // MSH-1 is the field separator itself, which the parser does not keep as a field: put it back so numbers match the standard.
      return { name: s.name, fields: s.name === 'MSH' && fields[0] !== '|' ? ['|', ...fields] : fields }
    })
  } catch {
    segments = r.raw
      .split(/\r\n?|\n/)
      .filter(Boolean)
      .map((line) => ({ name: line.slice(0, 3), fields: line.split('|').slice(1) }))
  }
  return { ...summary(r), segments, ack: r.ack, changes: r.changes ?? [] }
}

/** Messages received per hour over the last day (the Interfaces screen's activity). */
export async function perHour(sequelize: Sequelize): Promise<{ hour: string; count: number }[]> {
  const rows = await sequelize.query<{ hour: string; count: number }>(
    `SELECT DATE_FORMAT(received_at, '%Y-%m-%dT%H:00:00Z') AS hour, COUNT(*) AS count FROM hl7_messages
     WHERE received_at >= ? GROUP BY hour ORDER BY hour`,
    { type: QueryTypes.SELECT, replacements: [new Date(Date.now() - 24 * 3600_000)] },
  )
  return rows.map((r) => ({ hour: r.hour, count: Number(r.count) }))
}

/** The last 24 hours by outcome and by error code: how the interface is doing, with no patient in it. */
export async function outcomeCounts(sequelize: Sequelize): Promise<Pick<Hl7Overview, 'outcomes' | 'errorCodes'>> {
  const since = new Date(Date.now() - 24 * 3600_000)
  const outcomes = await sequelize.query<{ outcome: Hl7Outcome; count: number }>(
    'SELECT outcome, COUNT(*) AS count FROM hl7_messages WHERE received_at >= ? GROUP BY outcome ORDER BY outcome',
    { type: QueryTypes.SELECT, replacements: [since] },
  )
  const codes = await sequelize.query<{ code: string; count: number }>(
    'SELECT error_code AS code, COUNT(*) AS count FROM hl7_messages WHERE received_at >= ? AND error_code IS NOT NULL GROUP BY ' +
      'error_code ORDER BY count DESC, code LIMIT 20',
    { type: QueryTypes.SELECT, replacements: [since] },
  )
  return {
    outcomes: outcomes.map((o) => ({ outcome: o.outcome, count: Number(o.count) })),
    errorCodes: codes.map((c) => ({ code: c.code, count: Number(c.count) })),
  }
}

export async function attentionCount(): Promise<number> {
  return Hl7MessageRow.count({ where: { needsAttention: true } })
}

/** Retention: messages past it go, except those still waiting for someone in the queue. */
export async function deleteExpired(retentionDays: number): Promise<number> {
  return Hl7MessageRow.destroy({
    where: { receivedAt: { [Op.lt]: new Date(Date.now() - retentionDays * 86_400_000) }, needsAttention: false },
  })
}
