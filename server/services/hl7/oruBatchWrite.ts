import type { Sequelize, Transaction } from 'sequelize'
import { insertResultsReturningIds, type NewResult } from '../resultStore'
import { rescreenReferrals, screeningView } from '../screening'
import { buildAck } from './ack'
import { mrnOf, type Incoming } from './header'
import { addedDetail, hl7Result, movesScreening, type ObxDecision } from './obxDecision'
import type { ObxReading } from './oruRead'
import type { Plan, Resolved } from './oruBatch'
import { insertMessages, insertResultAudits, messageKey, setChanges, type MessageRow, type ResultAudit } from './oruBatchSql'
import { deriveForGroup, type Change } from './oruStore'
import { refreshEpisodeFacts } from '../reports/episodeFacts'
import { refreshHbMilestones } from '../reports/referralMilestones'

/**
 * The write side of the HL7 batch path (oruBatch.ts decides, this writes): one statement per kind
 * of row for the whole batch, in the order the per-message path writes them for one message.
 */

/** Batches and messages stored by this path in this process (the tests check the batch path was taken). */
export const oruBatchStats = { batches: 0, messages: 0 }

/** Everything the batch stores, one statement per kind of row; the ACKs in the batch's order. */
export async function writeOruBatch(
  sequelize: Sequelize,
  batch: Incoming[],
  plans: Plan[],
  decisions: Map<ObxReading, ObxDecision>,
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
  const news: { result: NewResult; o: ObxReading; change: Change['kind']; changes: Change[] }[] = []
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
      kind: n.change,
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
  // Every episode that got a result (not only those whose screening moved): the quality report's Hb facts.
  const changed = [...perGroup].filter(([, changes]) => changes.length).map(([r]) => r.referral.id)
  await refreshEpisodeFacts(t, changed)
  await refreshHbMilestones(t, changed) // the funnel's and waiting times' first and last Hb
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
function messageRow(m: Incoming, p: Plan & { kind: 'problem' | 'oru' }, ack: string, decisions: Map<ObxReading, ObxDecision>): MessageRow {
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
