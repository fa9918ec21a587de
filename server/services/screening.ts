import { Op, type Sequelize, type Transaction } from 'sequelize'
import { classifyAnaemia, IRON_STATUS_CRITERIA, type AnaemiaCriteria, type Sex } from '../../shared/clinical'
import {
  SCREENING_ANALYTES,
  ironStudiesFromRows,
  latestFromRows,
  screeningOutcome,
  type LatestValues,
  type ScreeningColumns,
} from '../../shared/clinic/screening'
import type { IronStudies } from '../../shared/clinic/ironStudies'
import { STAGE_LABELS } from '../../shared/pathway'
import { Referral, Result } from '../models/index'
import { screenableSql, SCREENABLE_WHERE } from '../models/result'
import { isoOrNull } from './viewer'
import { worklistChanged } from './worklistCounts'
import { dosesOf, ironFlags, refreshIronResponse } from './ironResponse'
import type { DoseGiven } from '../../shared/clinic/responseFlags'
import { rawInTransaction, type RawValue } from './rawTransaction'
import { utcParam } from './rawRead'
import { utcText } from './utcText'
import type { ScreeningView } from '../../shared/pathway/views'
import { setImmediate as yieldToIo } from 'node:timers/promises'
import { SerialWrites } from './serialWrites'

/** Latest of each screening analyte on the episode (by time taken, then by entry). */
export async function latestValues(referralId: number, t?: Transaction): Promise<LatestValues> {
  return latestFromRows(await screeningRows(referralId, t))
}

/** The latest ferritin, TSAT and CRP with their sample times, for the verdict's age rule. */
export async function latestIronStudies(referralId: number, t?: Transaction): Promise<IronStudies> {
  return ironStudiesFromRows(await screeningRows(referralId, t))
}

async function screeningRows(referralId: number, t?: Transaction) {
  return Result.findAll({
    where: { referralId, analyte: { [Op.in]: [...SCREENING_ANALYTES] }, ...SCREENABLE_WHERE },
    order: [
      ['takenAt', 'DESC'],
      ['id', 'DESC'],
    ],
    attributes: ['analyte', 'valueCanonical', 'takenAt'],
    transaction: t,
    raw: true,
  })
}

/** Re-derives the outcome and stores it on the referral row (the worklist reads it from there). */
export async function refreshScreening(referral: Referral, sex: Sex, t: Transaction): Promise<ScreeningColumns> {
  const next = screeningOutcome(await latestValues(referral.id, t), sex, referral.anaemiaCriteria)
  // Derived data, not an edit: the referral's version (the optimistic lock on decisions) stays.
  worklistChanged('referral', t)
  await Referral.update(next, { where: { id: referral.id }, transaction: t })
  await refreshIronResponse(Referral.sequelize!, [referral.id], t)
  return next
}

export interface ReferralScreeningRow {
  id: number
  sex: Sex
  criteria: AnaemiaCriteria
}

/**
 * The same re-screening as refreshScreening, for many referrals at once (a laboratory import or
 * its reversal, once per episode at the end), a thousand episodes per chunk: three reads and one
 * UPDATE each, all through the driver (rawTransaction.ts). The next chunk's reads are sent as soon
 * as this chunk's have answered, and each chunk's UPDATE goes through `writes` (serialWrites.ts:
 * one write at a time, nothing sent after a failed one), so MariaDB reads and writes while the
 * server applies the rules, which it does a slice of episodes at a time, letting the writes' answers
 * in between. Same rules, same columns. With no `writes` of the caller's, it waits for its own.
 */
export async function refreshScreeningMany(
  sequelize: Sequelize,
  referralIds: readonly number[],
  t: Transaction,
  writes?: SerialWrites,
  chunk = 1000,
): Promise<number> {
  const queue = writes ?? new SerialWrites()
  const chunks: number[][] = []
  for (let i = 0; i < referralIds.length; i += chunk) chunks.push(referralIds.slice(i, i + chunk))
  let updated = 0
  let next = chunks.length ? readChunk(sequelize, chunks[0]!, t) : null
  for (let i = 0; next; i++) {
    const read = await next
    next = i + 1 < chunks.length ? readChunk(sequelize, chunks[i + 1]!, t) : null
    const values: RawValue[][] = []
    const byReferral = groupByReferral(read.rows)
    for (let at = 0; at < read.refs.length; at += SLICE) {
      if (at > 0) await yieldToIo()
      for (const ref of read.refs.slice(at, at + SLICE)) values.push(outcomeOf(ref, byReferral.get(ref.id), read.doses).row)
    }
    // A failed UPDATE is reported by drained(); nothing is sent after it.
    queue.now(() => sendOutcomes(sequelize, values, t)).catch(() => undefined)
    updated += read.refs.length
  }
  if (!writes) await queue.drained()
  return updated
}

/** Episodes whose rules run between two turns of the event loop (a few ms of server CPU). */
const SLICE = 100

interface ScreeningRow {
  referralId: number
  analyte: string
  valueCanonical: number
  takenAt: Date
}
type ScreeningText = Omit<ScreeningRow, 'takenAt'> & { takenAt: string }
interface ChunkRead {
  refs: readonly ReferralScreeningRow[]
  rows: ScreeningText[]
  doses: Map<number, DoseGiven[]>
}

/**
 * What one chunk's re-screening reads, sent together: the referrals' sex and criteria (unless the
 * caller read them), every screening result (newest first, the time as text: utcText.ts) and the
 * doses. A promise left waiting is marked handled at once, so a failure is reported where it is awaited.
 */
function readChunk(sequelize: Sequelize, ids: readonly number[], t: Transaction, known?: readonly ReferralScreeningRow[]) {
  const list = ids.map(() => '?').join(', ')
  const refs =
    known ??
    rawInTransaction<ReferralScreeningRow[]>(
      sequelize,
      t,
      `SELECT r.id, p.sex, r.anaemia_criteria AS criteria FROM referrals r JOIN patients p ON p.id = r.patient_id WHERE r.id IN (${list})`,
      ids,
    )
  const rows = rawInTransaction<ScreeningText[]>(
    sequelize,
    t,
    `SELECT referral_id AS referralId, analyte, value_canonical AS valueCanonical, ${utcText('taken_at')} AS takenAt FROM results
     WHERE referral_id IN (${list}) AND analyte IN (${SCREENING_ANALYTES.map(() => '?').join(', ')})
       AND ${screenableSql()} ORDER BY referral_id, taken_at DESC, id DESC`,
    [...ids, ...SCREENING_ANALYTES],
  )
  const doses = dosesOf(sequelize, ids, t)
  const all = Promise.all([refs, rows, doses]).then(([r, w, d]): ChunkRead => ({ refs: r, rows: w, doses: d }))
  all.catch(() => undefined)
  return all
}

/**
 * The chunk's outcomes as one JSON parameter read by JSON_TABLE (MariaDB 10.6+), one array per
 * episode: the types are those the UNION ALL of one cast SELECT per episode gave, which cost
 * MariaDB about 76 ms of CPU per 1000 episodes to parse and plan against about 32 ms for this
 * (the same rows written; README, performance notes), and the server no longer builds and scans a
 * statement of 9000 placeholders. A JSON null reads as NULL.
 */
const OUTCOMES = `JSON_TABLE(?, '$[*]' COLUMNS (id BIGINT UNSIGNED PATH '$[0]', anaemic BIGINT PATH '$[1]', sev CHAR(10) PATH '$[2]',
  iron CHAR(20) PATH '$[3]', prop CHAR(12) PATH '$[4]', hb DOUBLE PATH '$[5]', hb_at DATETIME PATH '$[6]', nr BIGINT PATH '$[7]',
  fa BIGINT PATH '$[8]'))`

/** The chunk's screening rows by episode, in the order read (newest first); their times stay text until used. */
function groupByReferral(rows: readonly ScreeningText[]): Map<number, ScreeningText[]> {
  const out = new Map<number, ScreeningText[]>()
  for (const r of rows) {
    const list = out.get(r.referralId)
    if (list) list.push(r)
    else out.set(r.referralId, [r])
  }
  return out
}

/**
 * One episode's rules (pure, shared/clinic) and its row of the UPDATE: the outcome and the iron-response flags
 * together (the flags read the same Hb rows oldest first: refreshIronResponse's rule, for an episode given iron).
 */
function outcomeOf(
  ref: ReferralScreeningRow,
  texts: readonly ScreeningText[] | undefined,
  doses: Map<number, DoseGiven[]>,
): { next: ScreeningColumns; row: RawValue[] } {
  const own: ScreeningRow[] = (texts ?? []).map((x) => ({
    referralId: x.referralId,
    analyte: x.analyte,
    valueCanonical: x.valueCanonical,
    takenAt: new Date(x.takenAt),
  }))
  const next = screeningOutcome(latestFromRows(own), ref.sex, ref.criteria)
  const given = doses.get(ref.id)
  const hb = given ? own.filter((r) => r.analyte === 'hb').map((r) => ({ takenAt: r.takenAt, hbGL: Number(r.valueCanonical) })) : []
  const flags = ironFlags(hb.reverse(), given)
  return {
    next,
    row: [
      ref.id,
      next.anaemic == null ? null : next.anaemic ? 1 : 0,
      next.anaemiaSeverity,
      next.ironStatus,
      next.proposedStage,
      next.latestHbGL,
      next.latestHbAt ? utcParam(next.latestHbAt) : null,
      flags.noResponseToIron ? 1 : 0,
      flags.hbFallingAfterIron ? 1 : 0,
    ],
  }
}

/**
 * The one UPDATE that stores a chunk's outcomes and flags. Derived data, not an edit: the version (the optimistic
 * lock on decisions) stays.
 */
function sendOutcomes(sequelize: Sequelize, values: readonly RawValue[][], t: Transaction): Promise<unknown> {
  worklistChanged('referral', t)
  if (!values.length) return Promise.resolve()
  return rawInTransaction(
    sequelize,
    t,
    `UPDATE referrals r JOIN ${OUTCOMES} v ON v.id = r.id
     SET r.anaemic = v.anaemic, r.anaemia_severity = v.sev, r.iron_status = v.iron, r.proposed_stage = v.prop,
         r.latest_hb_gl = v.hb, r.latest_hb_at = v.hb_at, r.updated_at = ?,
         r.no_response_to_iron = v.nr, r.hb_falling_after_iron = v.fa`,
    [JSON.stringify(values), new Date()],
  )
}

/**
 * refreshScreeningMany for referrals whose sex and criteria the caller has already read (the HL7
 * batch path reads them with its lock): the same reads and one UPDATE; returns each referral's new
 * screening columns.
 */
export async function rescreenReferrals(
  sequelize: Sequelize,
  refs: readonly ReferralScreeningRow[],
  t: Transaction,
): Promise<Map<number, ScreeningColumns>> {
  if (!refs.length) return new Map()
  const read = await readChunk(
    sequelize,
    refs.map((r) => r.id),
    t,
    refs,
  )
  const out = new Map<number, ScreeningColumns>()
  const values: RawValue[][] = []
  const byReferral = groupByReferral(read.rows)
  for (const ref of read.refs) {
    const { next, row } = outcomeOf(ref, byReferral.get(ref.id), read.doses)
    out.set(ref.id, next)
    values.push(row)
  }
  await sendOutcomes(sequelize, values, t)
  return out
}

/** What screeningView reads of a referral: its screening columns and criteria (a model or a plain row). */
export type ScreenedReferral = Pick<
  Referral,
  'anaemic' | 'anaemiaSeverity' | 'ironStatus' | 'proposedStage' | 'anaemiaCriteria' | 'latestHbGL' | 'latestHbAt'
>

export function screeningView(r: ScreenedReferral, sex: Sex): ScreeningView {
  // The threshold depends only on criteria and sex; 130 stands in when no Hb exists yet.
  const rule = classifyAnaemia({ hbGL: r.latestHbGL ?? 130, sex, criteria: r.anaemiaCriteria })
  return {
    anaemic: r.anaemic == null ? null : Boolean(r.anaemic),
    severity: r.anaemiaSeverity,
    ironStatus: r.ironStatus,
    proposedStage: r.proposedStage,
    proposedStageLabel: r.proposedStage ? STAGE_LABELS[r.proposedStage] : null,
    criteria: r.anaemiaCriteria,
    thresholdGL: rule.thresholdGL,
    basis: rule.basis,
    ironCriteria: IRON_STATUS_CRITERIA,
    latestHbGL: r.latestHbGL,
    latestHbAt: isoOrNull(r.latestHbAt),
  }
}
