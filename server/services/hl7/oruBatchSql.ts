import { QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import type { AnaemiaCriteria, AnaemiaSeverity, IronStatus, Sex } from '../../../shared/clinical'
import type { Stage } from '../../../shared/pathway'
import type { Hl7Outcome } from '../../../shared/hl7'
import type { SampleRow } from './obxDecision'

/**
 * The statements of the HL7 batch path (oruBatch.ts): each reads or writes what a whole batch
 * needs in one round trip, where the per-message path runs one model call per message and row.
 * Plain SQL through Sequelize's connection, in the batch's transaction.
 */

const ENDED = ['closed', 'withdrawn']

/** A sender's control id: the unique key of hl7_messages. */
export const messageKey = (k: { sendingApp: string; sendingFacility: string; controlId: string }) =>
  `${k.sendingApp}\u0000${k.sendingFacility}\u0000${k.controlId}`

/** The ACKs already given to any of these control ids (by earlier transactions). */
export async function storedAcks(
  sequelize: Sequelize,
  keys: readonly { sendingApp: string; sendingFacility: string; controlId: string }[],
  t: Transaction,
): Promise<Map<string, string>> {
  if (!keys.length) return new Map()
  const rows = await sequelize.query<{ sendingApp: string; sendingFacility: string; controlId: string; ack: string }>(
    `SELECT sending_app AS sendingApp, sending_facility AS sendingFacility, control_id AS controlId, ack FROM hl7_messages
     WHERE ${keys.map(() => '(sending_app = ? AND sending_facility = ? AND control_id = ?)').join(' OR ')}`,
    { type: QueryTypes.SELECT, replacements: keys.flatMap((k) => [k.sendingApp, k.sendingFacility, k.controlId]), transaction: t },
  )
  return new Map(rows.map((r) => [messageKey(r), r.ack]))
}

/** A patient of the batch, with the episode a result of theirs goes to (the newest open one) and its screening columns. */
export interface LockedPatient {
  patientId: number
  mrn: string
  sex: Sex
  dateOfBirth: string
  referral: {
    id: number
    anaemic: boolean | null
    anaemiaSeverity: AnaemiaSeverity | null
    anaemiaCriteria: AnaemiaCriteria
    ironStatus: IronStatus | null
    proposedStage: Stage | null
    latestHbGL: number | null
    latestHbAt: Date | null
  } | null
}

/**
 * Every patient with one of these MRNs and their open episodes, locked (as the per-message path
 * locks the episode a result goes to) in one read; a patient with no open episode comes back
 * with `referral: null`, an unknown MRN not at all.
 */
export async function lockPatients(sequelize: Sequelize, mrns: readonly string[], t: Transaction): Promise<Map<string, LockedPatient>> {
  const out = new Map<string, LockedPatient>()
  if (!mrns.length) return out
  const rows = await sequelize.query<{
    patientId: number
    mrn: string
    sex: Sex
    dob: string | Date
    id: number | null
    anaemic: number | null
    sev: AnaemiaSeverity | null
    criteria: AnaemiaCriteria
    iron: IronStatus | null
    prop: Stage | null
    hb: number | null
    hbAt: Date | null
  }>(
    `SELECT p.id AS patientId, p.mrn, p.sex, p.date_of_birth AS dob, r.id, r.anaemic, r.anaemia_severity AS sev,
       r.anaemia_criteria AS criteria, r.iron_status AS iron, r.proposed_stage AS prop, r.latest_hb_gl AS hb, r.latest_hb_at AS hbAt
     FROM patients p LEFT JOIN referrals r ON r.patient_id = p.id AND r.stage NOT IN (:ended)
     WHERE p.mrn IN (:mrns) ORDER BY r.id DESC FOR UPDATE`,
    { type: QueryTypes.SELECT, replacements: { mrns: [...new Set(mrns)], ended: ENDED }, transaction: t },
  )
  for (const r of rows) {
    // Newest open episode first: the first row of a patient is theirs.
    if (out.has(r.mrn)) continue
    out.set(r.mrn, {
      patientId: r.patientId,
      mrn: r.mrn,
      sex: r.sex,
      dateOfBirth: r.dob instanceof Date ? r.dob.toISOString().slice(0, 10) : String(r.dob),
      referral:
        r.id === null
          ? null
          : {
              id: r.id,
              anaemic: r.anaemic === null ? null : Boolean(r.anaemic),
              anaemiaSeverity: r.sev,
              anaemiaCriteria: r.criteria,
              ironStatus: r.iron,
              proposedStage: r.prop,
              latestHbGL: r.hb,
              latestHbAt: r.hbAt,
            },
    })
  }
  return out
}

/** A sample: one episode's test at one time taken. */
export interface SampleKey {
  referralId: number
  analyte: string
  takenAt: Date
}
export const sampleKey = (s: SampleKey) => `${s.referralId}|${s.analyte}|${s.takenAt.getTime()}`

/** Every stored row of each sample, voided ones too, oldest first (what decideObx reads). */
export async function sampleRows(sequelize: Sequelize, samples: readonly SampleKey[], t: Transaction): Promise<Map<string, SampleRow[]>> {
  const out = new Map<string, SampleRow[]>(samples.map((s) => [sampleKey(s), []]))
  if (!samples.length) return out
  const rows = await sequelize.query<SampleRow & SampleKey>(
    `SELECT id, referral_id AS referralId, analyte, taken_at AS takenAt, status, comparator, value_canonical AS valueCanonical,
       voided_at AS voidedAt FROM results
     WHERE ${samples.map(() => '(referral_id = ? AND analyte = ? AND taken_at = ?)').join(' OR ')} ORDER BY id`,
    { type: QueryTypes.SELECT, replacements: samples.flatMap((s) => [s.referralId, s.analyte, s.takenAt]), transaction: t },
  )
  for (const r of rows) out.get(sampleKey({ ...r, takenAt: new Date(r.takenAt) }))?.push(r)
  return out
}

/** One row of the message log, with its final answer (changes may follow in setChanges). */
export interface MessageRow {
  receivedAt: Date
  controlId: string
  sendingApp: string
  sendingFacility: string
  messageType: string
  version: string
  raw: string
  outcome: Hl7Outcome
  ackCode: string
  ack: string
  errorCode: string | null
  errorText: string | null
  changes: object[] | null
  patientMrn: string | null
  needsAttention: boolean
}

/**
 * The batch's message rows in one INSERT; their ids by control id (RETURNING: ids are not assumed
 * consecutive, as Galera's auto_increment_increment may space them). A control id stored meanwhile
 * by another transaction fails the INSERT: the caller then stores the batch the per-message way.
 */
export async function insertMessages(sequelize: Sequelize, rows: readonly MessageRow[], t: Transaction): Promise<Map<string, number>> {
  if (!rows.length) return new Map()
  const now = new Date()
  const ids = await sequelize.query<{ id: number; sendingApp: string; sendingFacility: string; controlId: string }>(
    `INSERT INTO hl7_messages (received_at, control_id, sending_app, sending_facility, message_type, version, raw, outcome, ack_code,
       ack, error_code, error_text, changes, patient_mrn, needs_attention, attempts, processed_at)
     VALUES ${rows.map(() => '(?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, ?, 1, ?)').join(', ')}
     RETURNING id, sending_app AS sendingApp, sending_facility AS sendingFacility, control_id AS controlId`,
    {
      type: QueryTypes.SELECT,
      transaction: t,
      replacements: rows.flatMap((r) => [
        r.receivedAt,
        r.controlId,
        r.sendingApp,
        r.sendingFacility,
        r.messageType,
        r.version,
        r.raw,
        r.outcome,
        r.ackCode,
        r.ack,
        r.errorCode,
        r.errorText,
        r.changes === null ? null : JSON.stringify(r.changes),
        r.patientMrn,
        r.needsAttention ? 1 : 0,
        now,
      ]),
    },
  )
  return new Map(ids.map((r) => [messageKey(r), r.id]))
}

/** The records each stored message changed, known only once its results have ids: one UPDATE for the batch. */
export async function setChanges(sequelize: Sequelize, changes: ReadonlyMap<number, object[]>, t: Transaction): Promise<void> {
  if (!changes.size) return
  const entries = [...changes]
  await sequelize.query(`UPDATE hl7_messages SET changes = CASE id ${entries.map(() => 'WHEN ? THEN ?').join(' ')} END WHERE id IN (?)`, {
    type: QueryTypes.UPDATE,
    transaction: t,
    replacements: [...entries.flatMap(([id, c]) => [id, JSON.stringify(c)]), entries.map(([id]) => id)],
  })
}

/** An audit row as recordAudit writes it for a message's results on one episode. */
export interface ResultAudit {
  referralId: number
  patientId: number
  requestId: string
  before: object
  after: object
}

/** The batch's audit rows in one INSERT (same columns and values as recordAudit; the table stays append-only). */
export async function insertResultAudits(sequelize: Sequelize, rows: readonly ResultAudit[], t: Transaction): Promise<void> {
  if (!rows.length) return
  const at = new Date()
  await sequelize.query(
    `INSERT INTO audit_entries (at, user_id, action, entity, entity_id, patient_id, \`before\`, \`after\`, request_id, ip)
     VALUES ${rows.map(() => "(?, NULL, 'hl7-results', 'referral', ?, ?, ?, ?, ?, NULL)").join(', ')}`,
    {
      type: QueryTypes.INSERT,
      transaction: t,
      replacements: rows.flatMap((r) => [
        at,
        String(r.referralId),
        r.patientId,
        JSON.stringify(r.before),
        JSON.stringify(r.after),
        r.requestId,
      ]),
    },
  )
}
