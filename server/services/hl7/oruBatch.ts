import type { Sequelize, Transaction } from 'sequelize'
import type { Config } from '../../config'
import { codesFor } from '../imports/mappings'
import { buildAck, Hl7Problem } from './ack'
import { checkHeader, type Incoming } from './header'
import { decideObx, type ObxDecision } from './obxDecision'
import { readOru, type ObxReading, type OruGroup } from './oruRead'
import { lockPatients, messageKey, sampleKey, sampleRows, storedAcks, type LockedPatient } from './oruBatchSql'
import { writeOruBatch } from './oruBatchWrite'
import { noOpenReferral, takenBeforeBirth, unknownMrn } from './oruStore'

/** A group (one PID) whose patient and open episode were found: its OBX go to that episode. */
export interface Resolved {
  g: OruGroup
  patient: LockedPatient
  referral: NonNullable<LockedPatient['referral']>
}

/** What one message of the batch comes to, decided before anything is written. */
export type Plan =
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
  const decisions = new Map<ObxReading, ObxDecision>()
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
  return writeOruBatch(sequelize, batch, plans, decisions, t)
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
