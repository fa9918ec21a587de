import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { Patient, Referral, Result } from '../../models/index'
import type { ResultStatus } from '../../../shared/pathway/views'
import { recordAudit, type Actor } from '../audit'
import { deriveEgfr, deriveTsat, storeResult } from '../resultStore'
import { refreshScreening, screeningView } from '../screening'
import { Hl7Problem } from './ack'
import { addedDetail, decideObx, hl7Result, movesScreening } from './obxDecision'
import type { ObxReading, OruGroup } from './oruRead'
import { refreshEpisodeFacts } from '../reports/episodeFacts'
import { refreshHbMilestones } from '../reports/referralMilestones'

// Stages after which an episode takes no results (as for imports and bookings).
const ENDED = ['closed', 'withdrawn']

/** A result this message changed (shared/hl7 Hl7Change, narrowed). */
export interface Change {
  kind: 'result-added' | 'result-corrected' | 'result-voided' | 'result-promoted' | 'derived'
  resultId: number
  referralId: number
  analyte: string
  detail?: string
}

/** Voids rows (and the values derived from them); the rows stay, marked, as the episode's history. */
async function voidRows(sequelize: Sequelize, ids: number[], reason: string, t: Transaction): Promise<number[]> {
  if (!ids.length) return []
  const now = new Date()
  await Result.update({ voidedAt: now, voidReason: reason.slice(0, 200) }, { where: { id: { [Op.in]: ids } }, transaction: t })
  const derived = await sequelize.query<{ id: number }>(
    `SELECT id FROM results WHERE source = 'derived' AND voided_at IS NULL AND ` +
      `(${ids.map(() => 'JSON_CONTAINS(derived_from, ?)').join(' OR ')})`,
    { type: QueryTypes.SELECT, replacements: ids.map(String), transaction: t },
  )
  if (derived.length)
    await Result.update(
      { voidedAt: now, voidReason: `its source value was voided (${reason})`.slice(0, 200) },
      { where: { id: { [Op.in]: derived.map((d) => d.id) } }, transaction: t },
    )
  return [...ids, ...derived.map((d) => d.id)]
}

/**
 * One OBX against the episode, as decideObx (obxDecision.ts) decides it from the sample's rows:
 * the voiding, reviving or re-labelling of stored rows, or the new row, written here.
 */
async function applyObx(
  sequelize: Sequelize,
  o: ObxReading,
  ctx: { referralId: number; patientId: number; messageId: number; controlId: string },
  t: Transaction,
): Promise<Change[]> {
  const r = o.reading
  const sample = { referralId: ctx.referralId, analyte: r.analyte, takenAt: r.takenAt }
  // Every row of this sample, voided ones too, in one read: the live ones and the natural-key match come from it.
  const rows = await Result.findAll({
    where: sample,
    attributes: ['id', 'status', 'comparator', 'valueCanonical', 'voidedAt'],
    order: [['id', 'ASC']],
    transaction: t,
    raw: true,
  })
  const decision = decideObx(o, rows, ctx.controlId)
  const changes: Change[] = []
  const note = (kind: Change['kind'], resultId: number, detail?: string) =>
    changes.push({ kind, resultId, referralId: ctx.referralId, analyte: r.analyte, ...(detail ? { detail } : {}) })
  ;(await voidRows(sequelize, decision.voidIds, decision.voidReason, t)).forEach((id) => note('result-voided', id))
  const w = decision.write
  if (w.kind === 'nothing') return changes
  const status = o.action as ResultStatus
  if (w.kind === 'update') {
    await Result.update(
      {
        status,
        comparator: o.comparator,
        voidedAt: null,
        voidReason: null,
        referenceRange: o.range || null,
        abnormalFlags: o.flags || null,
      },
      { where: { id: w.resultId }, transaction: t },
    )
    note(w.change, w.resultId)
    return changes
  }
  const created = await storeResult(hl7Result(o, { ...ctx, hl7MessageId: ctx.messageId }), t)
  note(w.change, created.id, addedDetail(o))
  return changes
}

/**
 * The patient's newest open episode, locked, with what the rules need of the patient, in one
 * read; only when there is none does a second read tell an unknown patient from one with no
 * open episode.
 */
async function openReferral(mrn: string, t: Transaction): Promise<Referral & { patient: Patient }> {
  const r = (await Referral.findOne({
    where: { stage: { [Op.notIn]: ENDED } },
    include: [{ model: Patient, as: 'patient', where: { mrn }, attributes: ['id', 'dateOfBirth', 'sex'] }],
    order: [['id', 'DESC']],
    transaction: t,
    lock: t.LOCK.UPDATE,
  })) as (Referral & { patient: Patient }) | null
  if (r) return r
  if (!(await Patient.count({ where: { mrn }, transaction: t }))) throw unknownMrn(mrn)
  throw noOpenReferral(mrn)
}

// The AEs of a group whose results cannot be stored: the same words from both paths (per message, per batch).
export const unknownMrn = (mrn: string) =>
  new Hl7Problem('AE', 'unknown-mrn', `no patient has MRN ${mrn}`, '204', { segment: 'PID', field: 3 })
export const noOpenReferral = (mrn: string) =>
  new Hl7Problem('AE', 'no-open-referral', `patient ${mrn} has no open episode`, '204', { segment: 'PID', field: 3 })

/** An OBX taken before the patient was born: the whole message is refused. */
export function takenBeforeBirth(g: OruGroup, dateOfBirth: string): Hl7Problem | null {
  const early = g.obx.find((o) => o.action !== 'void' && o.reading.takenAt.toISOString().slice(0, 10) < dateOfBirth)
  return early
    ? new Hl7Problem('AE', 'bad-date', 'time taken is before the date of birth', '102', { segment: 'OBX', seq: early.seq, field: 14 })
    : null
}

/**
 * TSAT for each sample whose iron, TIBC or transferrin the group brought, and eGFR for each
 * creatinine it added, appended to `changes` (both paths: per message and per batch). Says whether
 * a TSAT was derived (it moves the screening).
 */
export async function deriveForGroup(
  g: OruGroup,
  ids: { referralId: number; patientId: number },
  patient: Pick<Patient, 'dateOfBirth' | 'sex'>,
  changes: Change[],
  t: Transaction,
): Promise<boolean> {
  let tsatDerived = false
  const usable = g.obx.filter((o) => o.action === 'final' || o.action === 'corrected')
  const samples = new Set(usable.filter((o) => IRON_FAMILY.includes(o.reading.analyte)).map((o) => o.reading.takenAt.getTime()))
  for (const at of samples) {
    const tsat = await deriveTsat({ ...ids, takenAt: new Date(at), enteredBy: null }, t)
    if (tsat) changes.push({ kind: 'derived', resultId: tsat.id, referralId: ids.referralId, analyte: 'tsat' })
    if (tsat) tsatDerived = true
  }
  for (const c of changes.filter((x) => x.analyte === 'creatinine' && x.kind !== 'result-voided')) {
    const row = await Result.findByPk(c.resultId, { transaction: t })
    const egfr = row && row.status !== 'preliminary' && !row.comparator ? await deriveEgfr(row, patient, t) : null
    if (egfr) changes.push({ kind: 'derived', resultId: egfr.id, referralId: ids.referralId, analyte: 'egfr' })
  }
  return tsatDerived
}

/** The analytes from which TSAT is worked out (with the sample's other two). */
export const IRON_FAMILY: readonly string[] = ['iron', 'tibc', 'transferrin']

/**
 * Stores an ORU^R01's results through the same rules as a typed-in result: the referral row is
 * locked, values derived (TSAT, eGFR) and the episode re-screened in the message's transaction,
 * with one audit row per episode naming the message.
 */
export async function storeOru(
  sequelize: Sequelize,
  groups: OruGroup[],
  ctx: { messageId: number; controlId: string; actor: Actor },
  t: Transaction,
): Promise<Change[]> {
  const all: Change[] = []
  for (const g of groups) {
    const referral = await openReferral(g.mrn, t)
    const patient = referral.patient
    const early = takenBeforeBirth(g, patient.dateOfBirth)
    if (early) throw early
    const before = screeningView(referral, patient.sex)
    const changes: Change[] = []
    let rescreen = false
    for (const o of g.obx) {
      const done = await applyObx(
        sequelize,
        o,
        { referralId: referral.id, patientId: patient.id, messageId: ctx.messageId, controlId: ctx.controlId },
        t,
      )
      rescreen ||= movesScreening(
        o,
        done.map((c) => c.kind),
      )
      changes.push(...done)
    }
    if (!changes.length) continue
    if (await deriveForGroup(g, { referralId: referral.id, patientId: patient.id }, patient, changes, t)) rescreen = true
    // The columns just written are the only ones that changed: set them here rather than read the row again.
    if (rescreen) referral.set(await refreshScreening(referral, patient.sex, t), { raw: true })
    await refreshEpisodeFacts(t, [referral.id]) // added, corrected, voided or promoted: the quality report's Hb facts
    await refreshHbMilestones(t, [referral.id]) // and the funnel's and waiting times' first and last Hb
    await recordAudit(t, ctx.actor, {
      action: 'hl7-results',
      entity: 'referral',
      entityId: referral.id,
      patientId: patient.id,
      before: { screening: before },
      after: { hl7MessageId: ctx.messageId, controlId: ctx.controlId, changes, screening: screeningView(referral, patient.sex) },
    })
    all.push(...changes)
  }
  return all
}
