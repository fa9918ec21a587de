import { Op, QueryTypes, type Sequelize, type Transaction } from 'sequelize'
import { Patient, Referral, Result } from '../../models/index'
import { SCREENING_ANALYTES } from '../../../shared/clinic/screening'
import { recordAudit, type Actor } from '../audit'
import { deriveEgfr, deriveTsat, storeResult } from '../resultStore'
import { refreshScreening, screeningView } from '../screening'
import { Hl7Problem } from './ack'
import type { ObxReading, OruGroup } from './oruRead'

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
 * One OBX against the episode: a final value is added (replacing a preliminary one of the same
 * sample), a correction replaces every earlier value of the sample, a deletion voids them, a
 * preliminary is kept but not screened and never overrides a final. The same value of the same
 * sample is the same row (the results' natural key): nothing new is stored for it.
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
  const live = rows.filter((l) => l.voidedAt === null)
  const changes: Change[] = []
  const note = (kind: Change['kind'], resultId: number, detail?: string) =>
    changes.push({ kind, resultId, referralId: ctx.referralId, analyte: r.analyte, ...(detail ? { detail } : {}) })
  if (o.action === 'void') {
    const voided = await voidRows(
      sequelize,
      live.map((l) => l.id),
      `deleted by the laboratory (message ${ctx.controlId})`,
      t,
    )
    voided.forEach((id) => note('result-voided', id))
    return changes
  }
  if (o.action === 'preliminary' && live.some((l) => l.status !== 'preliminary')) return changes
  const tol = r.tolerance ?? 0
  const matches = rows.filter((l) => l.valueCanonical >= r.valueCanonical - tol && l.valueCanonical <= r.valueCanonical + tol)
  const same = matches.find((l) => l.voidedAt === null) ?? matches[0]
  const replace = o.action === 'corrected' ? live : o.action === 'final' ? live.filter((l) => l.status === 'preliminary') : []
  const toVoid = replace.filter((l) => l.id !== same?.id).map((l) => l.id)
  const why =
    o.action === 'corrected'
      ? `corrected by the laboratory (message ${ctx.controlId})`
      : `replaced by the final value (message ${ctx.controlId})`
  ;(await voidRows(sequelize, toVoid, why, t)).forEach((id) => note('result-voided', id))
  const status = o.action
  if (same) {
    const unchanged =
      same.voidedAt === null &&
      (same.status === status || (status === 'final' && same.status === 'corrected')) &&
      same.comparator === o.comparator
    if (unchanged) return changes
    await Result.update(
      {
        status,
        comparator: o.comparator,
        voidedAt: null,
        voidReason: null,
        referenceRange: o.range || null,
        abnormalFlags: o.flags || null,
      },
      { where: { id: same.id }, transaction: t },
    )
    note(status === 'corrected' ? 'result-corrected' : 'result-promoted', same.id)
    return changes
  }
  const created = await storeResult(
    {
      ...sample,
      patientId: ctx.patientId,
      valueCanonical: r.valueCanonical,
      valueReported: r.value,
      unitReported: r.unit,
      enteredBy: null,
      source: 'hl7',
      status,
      comparator: o.comparator,
      hl7MessageId: ctx.messageId,
      referenceRange: o.range || null,
      abnormalFlags: o.flags || null,
    },
    t,
  )
  note(
    status === 'corrected' ? 'result-corrected' : 'result-added',
    created.id,
    `${o.comparator ?? ''}${r.value} ${r.unit}${status === 'preliminary' ? ' (preliminary)' : ''}`,
  )
  return changes
}

/**
 * Stores an ORU^R01's results through the same rules as a typed-in result: the referral row is
 * locked, values derived (TSAT, eGFR) and the episode re-screened in the message's transaction,
 * with one audit row per episode naming the message.
 */
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
  if (!(await Patient.count({ where: { mrn }, transaction: t })))
    throw new Hl7Problem('AE', 'unknown-mrn', `no patient has MRN ${mrn}`, '204', { segment: 'PID', field: 3 })
  throw new Hl7Problem('AE', 'no-open-referral', `patient ${mrn} has no open episode`, '204', { segment: 'PID', field: 3 })
}

/** Whether a change can move the screening: anything but adding a value the screening never reads. */
function movesScreening(o: ObxReading, changes: Change[]): boolean {
  if (changes.some((c) => c.kind !== 'result-added')) return true
  // Preliminary values and values beyond a limit are never screened; nor are tests outside the screening set.
  return (
    changes.length > 0 &&
    o.action !== 'preliminary' &&
    o.comparator === null &&
    (SCREENING_ANALYTES as readonly string[]).includes(o.reading.analyte)
  )
}

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
    const early = g.obx.find((o) => o.action !== 'void' && o.reading.takenAt.toISOString().slice(0, 10) < patient.dateOfBirth)
    if (early)
      throw new Hl7Problem('AE', 'bad-date', 'time taken is before the date of birth', '102', { segment: 'OBX', seq: early.seq, field: 14 })
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
      rescreen ||= movesScreening(o, done)
      changes.push(...done)
    }
    if (!changes.length) continue
    const usable = g.obx.filter((o) => o.action === 'final' || o.action === 'corrected')
    const samples = new Set(
      usable.filter((o) => ['iron', 'tibc', 'transferrin'].includes(o.reading.analyte)).map((o) => o.reading.takenAt.getTime()),
    )
    for (const at of samples) {
      const tsat = await deriveTsat({ referralId: referral.id, patientId: patient.id, takenAt: new Date(at), enteredBy: null }, t)
      if (tsat) changes.push({ kind: 'derived', resultId: tsat.id, referralId: referral.id, analyte: 'tsat' })
      if (tsat) rescreen = true
    }
    for (const c of changes.filter((x) => x.analyte === 'creatinine' && x.kind !== 'result-voided')) {
      const row = await Result.findByPk(c.resultId, { transaction: t })
      const egfr = row && row.status !== 'preliminary' && !row.comparator ? await deriveEgfr(row, patient, t) : null
      if (egfr) changes.push({ kind: 'derived', resultId: egfr.id, referralId: referral.id, analyte: 'egfr' })
    }
    // The columns just written are the only ones that changed: set them here rather than read the row again.
    if (rescreen) referral.set(await refreshScreening(referral, patient.sex, t), { raw: true })
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
