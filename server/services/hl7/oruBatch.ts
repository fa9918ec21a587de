import type { Sequelize, Transaction } from 'sequelize'
import type { Config } from '../../config'
import { codesFor } from '../imports/mappings'
import { insertResultsReturningIds, type NewResult } from '../resultStore'
import { rescreenReferrals, screeningView } from '../screening'
import { buildAck, Hl7Problem } from './ack'
import { checkHeader, mrnOf, type Incoming } from './header'
import { addedDetail, decideObx, hl7Result, movesScreening } from './obxDecision'
import { readOru, type ObxReading, type OruGroup } from './oruRead'
import {
  insertMessages,
  insertResultAudits,
  lockPatients,
  messageKey,
  sampleKey,
  sampleRows,
  setChanges,
  storedAcks,
  type LockedPatient,
  type MessageRow,
  type ResultAudit,
} from './oruBatchSql'
import { deriveForGroup, noOpenReferral, takenBeforeBirth, unknownMrn, type Change } from './oruStore'

/** A group (one PID) whose patient and open episode were found: its OBX go to that episode. */
interface Resolved {
  g: OruGroup
  patient: LockedPatient
  referral: NonNullable<LockedPatient['referral']>
}

/** What one message of the batch comes to, decided before anything is written. */
type Plan =
  | { kind: 'no-row'; ack: string } // no control id: AR, nothing to key a row on
  | { kind: 'answered'; ack: string } // the control id was answered before: that answer again
  | { kind: 'repeat'; of: number } // the control id came earlier in this batch: its answer
  | { kind: 'problem'; problem: Hl7Problem }
  | { kind: 'oru'; groups: OruGroup[]; resolved: Resolved[] }

/**
 * The batch path for ORU^R01 (group commit's fast path): a batch of messages costs a handful of
 * statements in all, not a dozen per message. The control ids already answered, the patients and
 * their open episodes (locked) and the samples' stored rows are read once for the batch; each OBX is
 * decided by the same pure rule as the per-message path (decideObx); the message rows, the results,
 * the re-screening, the audit rows and the message rows' change lists are then written once each.
 *
 * Returns null, before writing anything, when the batch holds what this path does not take: an SIU
 * or ADT, an OBX that voids, corrects or revives a stored row, or two messages (or groups) for one
 * episode or one sample; the caller then stores it the per-message way in the same transaction. Any
 * error (another node storing the same control id or result meanwhile) rolls the transaction back
 * and the caller stores each message alone.
 */
export async function storeOruBatch(sequelize: Sequelize, config: Config, batch: Incoming[], t: Transaction): Promise<string[] | null> {
  if (batch.some((m) => m.h.controlId && m.h.type !== 'ORU^R01' && isHandled(m))) return null
  const plans: Plan[] = []
  for (const m of batch) plans.push(await readMessage(config, m))
  // One read for the control ids already answered; a repeat within the batch gets its first copy's answer.
  const keyed = batch.map((m, i) => (plans[i]!.kind === 'no-row' ? null : messageKey(m.h)))
  const stored = await storedAcks(
    sequelize,
    batch.filter((_, i) => keyed[i] !== null).map((m) => m.h),
    t,
  )
  const firstOf = new Map<string, number>()
  keyed.forEach((key, i) => {
    if (key === null) return
    const earlier = stored.get(key)
    if (earlier !== undefined) plans[i] = { kind: 'answered', ack: earlier }
    else if (firstOf.has(key)) plans[i] = { kind: 'repeat', of: firstOf.get(key)! }
    else firstOf.set(key, i)
  })
  const orus = plans.flatMap((p) => (p.kind === 'oru' ? [p] : []))
  const patients = await lockPatients(
    sequelize,
    orus.flatMap((p) => p.groups.map((g) => g.mrn)),
    t,
  )
  plans.forEach((p, i) => {
    if (p.kind === 'oru') plans[i] = resolve(p.groups, patients)
  })
  const resolved = plans.flatMap((p) => (p.kind === 'oru' ? p.resolved : []))
  if (!distinctSamples(resolved)) return null
  const rows = await sampleRows(
    sequelize,
    resolved.flatMap((r) => r.g.obx.map((o) => ({ referralId: r.referral.id, analyte: o.reading.analyte, takenAt: o.reading.takenAt }))),
    t,
  )
  const decisions = new Map<ObxReading, ReturnType<typeof decideObx>>()
  for (const [i, p] of plans.entries()) {
    if (p.kind !== 'oru') continue
    for (const r of p.resolved)
      for (const o of r.g.obx) {
        const d = decideObx(o, rows.get(sampleKey({ referralId: r.referral.id, ...o.reading }))!, batch[i]!.h.controlId)
        // Voiding, correcting or reviving stored rows (and their derived values) is the per-message path's.
        if (d.voidIds.length || d.write.kind === 'update') return null
        decisions.set(o, d)
      }
  }
  return write(sequelize, batch, plans, decisions, t)
}

const isHandled = (m: Incoming) => {
  try {
    checkHeader(m.h)
    return true
  } catch {
    return false
  }
}

/** The message's header and OBX checked as the per-message path checks them (no statement: the codes are cached). */
async function readMessage(config: Config, m: Incoming): Promise<Plan> {
  try {
    checkHeader(m.h)
    const codes = await codesFor(m.h.sendingFacility || m.h.sendingApp)
    const groups = readOru(m.msg, { authority: config.hl7.assigningAuthority, codes, timeZone: config.clinic.timeZone, now: Date.now() })
    return { kind: 'oru', groups, resolved: [] }
  } catch (err) {
    if (!(err instanceof Hl7Problem)) throw err
    return m.h.controlId ? { kind: 'problem', problem: err } : { kind: 'no-row', ack: buildAck(m.msg, 'AR', err) }
  }
}

/** Each group's patient and open episode, or the AE the per-message path gives (its first group that fails). */
function resolve(groups: OruGroup[], patients: Map<string, LockedPatient>): Plan {
  const resolved: Resolved[] = []
  for (const g of groups) {
    const patient = patients.get(g.mrn)
    if (!patient) return { kind: 'problem', problem: unknownMrn(g.mrn) }
    if (!patient.referral) return { kind: 'problem', problem: noOpenReferral(g.mrn) }
    const early = takenBeforeBirth(g, patient.dateOfBirth)
    if (early) return { kind: 'problem', problem: early }
    resolved.push({ g, patient, referral: patient.referral })
  }
  return { kind: 'oru', groups, resolved }
}

/** Each episode once in the batch, each sample once in its group: then no OBX depends on another's write. */
function distinctSamples(resolved: Resolved[]): boolean {
  const referrals = new Set(resolved.map((r) => r.referral.id))
  if (referrals.size !== resolved.length) return false
  return resolved.every((r) => new Set(r.g.obx.map((o) => `${o.reading.analyte}|${o.reading.takenAt.getTime()}`)).size === r.g.obx.length)
}

/** Batches and messages stored by this path in this process (the tests check the batch path was taken). */
export const oruBatchStats = { batches: 0, messages: 0 }

/** Everything the batch stores, one statement per kind of row; the ACKs in the batch's order. */
async function write(
  sequelize: Sequelize,
  batch: Incoming[],
  plans: Plan[],
  decisions: Map<ObxReading, ReturnType<typeof decideObx>>,
  t: Transaction,
): Promise<string[]> {
  const acks: (string | null)[] = plans.map((p, i) =>
    p.kind === 'problem' ? buildAck(batch[i]!.msg, p.problem.ack, p.problem) : p.kind === 'oru' ? buildAck(batch[i]!.msg, 'AA') : null,
  )
  const messageRows: MessageRow[] = []
  plans.forEach((p, i) => {
    if (p.kind === 'problem' || p.kind === 'oru') messageRows.push(messageRow(batch[i]!, p, acks[i]!, decisions))
  })
  const messageIds = await insertMessages(sequelize, messageRows, t)
  const idOf = (i: number) => messageIds.get(messageKey(batch[i]!.h))!
  // The new results, in OBX order, and who each one is for.
  const news: { result: NewResult; o: ObxReading; change: string; changes: Change[] }[] = []
  const perGroup = new Map<Resolved, Change[]>()
  plans.forEach((p, i) => {
    if (p.kind !== 'oru') return
    for (const r of p.resolved) {
      const changes: Change[] = []
      perGroup.set(r, changes)
      for (const o of r.g.obx) {
        const w = decisions.get(o)!.write
        if (w.kind === 'insert')
          news.push({
            result: hl7Result(o, { referralId: r.referral.id, patientId: r.patient.patientId, hl7MessageId: idOf(i) }),
            o,
            change: w.change,
            changes,
          })
      }
    }
  })
  const resultIds = await insertResultsReturningIds(
    sequelize,
    news.map((n) => n.result),
    t,
  )
  news.forEach((n, k) =>
    n.changes.push({
      kind: n.change as Change['kind'],
      resultId: resultIds[k]!,
      referralId: n.result.referralId,
      analyte: n.result.analyte,
      detail: addedDetail(n.o),
    }),
  )
  // Derived values (only when the batch brings iron studies or a creatinine), then one re-screening of the episodes that moved.
  const rescreen: Resolved[] = []
  for (const [r, changes] of perGroup) {
    if (!changes.length) continue
    const tsat = await deriveForGroup(r.g, { referralId: r.referral.id, patientId: r.patient.patientId }, r.patient, changes, t)
    const moved = r.g.obx.some((o) =>
      movesScreening(
        o,
        news.filter((n) => n.o === o).map((n) => n.change),
      ),
    )
    if (tsat || moved) rescreen.push(r)
  }
  const screened = await rescreenReferrals(
    sequelize,
    rescreen.map((r) => ({ id: r.referral.id, sex: r.patient.sex, criteria: r.referral.anaemiaCriteria })),
    t,
  )
  const audits: ResultAudit[] = []
  const messageChanges = new Map<number, Change[]>()
  plans.forEach((p, i) => {
    if (p.kind !== 'oru') return
    const all: Change[] = []
    for (const r of p.resolved) {
      const changes = perGroup.get(r)!
      if (!changes.length) continue
      const after = { ...r.referral, ...screened.get(r.referral.id) }
      audits.push({
        referralId: r.referral.id,
        patientId: r.patient.patientId,
        requestId: `hl7:${idOf(i)}`,
        before: { screening: screeningView(r.referral, r.patient.sex) },
        after: { hl7MessageId: idOf(i), controlId: batch[i]!.h.controlId, changes, screening: screeningView(after, r.patient.sex) },
      })
      all.push(...changes)
    }
    if (all.length) messageChanges.set(idOf(i), all)
  })
  await insertResultAudits(sequelize, audits, t)
  await setChanges(sequelize, messageChanges, t)
  oruBatchStats.batches += 1
  oruBatchStats.messages += batch.length
  return plans.map((p, i) => (p.kind === 'answered' || p.kind === 'no-row' ? p.ack : p.kind === 'repeat' ? acks[p.of]! : acks[i]!))
}

/** The message log's row, as the per-message path leaves it (the change list follows once results have ids). */
function messageRow(
  m: Incoming,
  p: Plan & { kind: 'problem' | 'oru' },
  ack: string,
  decisions: Map<ObxReading, ReturnType<typeof decideObx>>,
): MessageRow {
  const base = {
    receivedAt: m.receivedAt,
    controlId: m.h.controlId,
    sendingApp: m.h.sendingApp,
    sendingFacility: m.h.sendingFacility,
    messageType: m.h.type,
    version: m.h.version,
    raw: m.raw,
    ack,
    patientMrn: mrnOf(m.msg),
  }
  if (p.kind === 'problem') {
    const ae = p.problem.ack === 'AE'
    return {
      ...base,
      outcome: ae ? 'error' : 'rejected',
      ackCode: p.problem.ack,
      errorCode: p.problem.code,
      errorText: p.problem.message.slice(0, 1000),
      changes: null,
      needsAttention: ae,
    }
  }
  const adds = p.resolved.some((r) => r.g.obx.some((o) => decisions.get(o)!.write.kind === 'insert'))
  return {
    ...base,
    outcome: adds ? 'stored' : 'nothing-new',
    ackCode: 'AA',
    errorCode: null,
    errorText: null,
    changes: [],
    needsAttention: false,
  }
}
