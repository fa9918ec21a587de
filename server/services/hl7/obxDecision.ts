import { SCREENING_ANALYTES } from '../../../shared/clinic/screening'
import type { ResultStatus } from '../../../shared/pathway/views'
import type { NewResult } from '../resultStore'
import type { ObxReading } from './oruRead'

/** A row already stored for an OBX's sample (same episode, test and time taken), voided ones included. */
export interface SampleRow {
  id: number
  status: ResultStatus
  comparator: string | null
  valueCanonical: number
  voidedAt: Date | null
}

/** What an OBX does after any voiding: nothing, revive or re-label a stored row, or store a new one. */
export type ObxWrite =
  | { kind: 'nothing' }
  | { kind: 'update'; resultId: number; change: 'result-corrected' | 'result-promoted' }
  | { kind: 'insert'; change: 'result-corrected' | 'result-added' }

export interface ObxDecision {
  /** Rows to void first (their derived values with them), and why. */
  voidIds: number[]
  voidReason: string
  write: ObxWrite
}

/**
 * What one OBX does to its sample, from the sample's rows (oldest first), without touching the
 * database, so the per-message path and the batch path take the same decision: a final value is
 * added (replacing a preliminary one of the same sample), a correction replaces every earlier value
 * of the sample, a deletion voids them, a preliminary is kept but not screened and never overrides a
 * final. The same value of the same sample is the same row (the results' natural key, within the
 * analyte's tolerance): nothing new is stored for it, though it may be revived or re-labelled.
 */
export function decideObx(o: ObxReading, rows: readonly SampleRow[], controlId: string): ObxDecision {
  const live = rows.filter((l) => l.voidedAt === null)
  const nothing: ObxWrite = { kind: 'nothing' }
  if (o.action === 'void')
    return { voidIds: live.map((l) => l.id), voidReason: `deleted by the laboratory (message ${controlId})`, write: nothing }
  const voidReason =
    o.action === 'corrected' ? `corrected by the laboratory (message ${controlId})` : `replaced by the final value (message ${controlId})`
  if (o.action === 'preliminary' && live.some((l) => l.status !== 'preliminary')) return { voidIds: [], voidReason, write: nothing }
  const r = o.reading
  const tol = r.tolerance ?? 0
  const matches = rows.filter((l) => l.valueCanonical >= r.valueCanonical - tol && l.valueCanonical <= r.valueCanonical + tol)
  const same = matches.find((l) => l.voidedAt === null) ?? matches[0]
  const replace = o.action === 'corrected' ? live : o.action === 'final' ? live.filter((l) => l.status === 'preliminary') : []
  const voidIds = replace.filter((l) => l.id !== same?.id).map((l) => l.id)
  const status = o.action
  if (same) {
    const unchanged =
      same.voidedAt === null &&
      (same.status === status || (status === 'final' && same.status === 'corrected')) &&
      same.comparator === o.comparator
    if (unchanged) return { voidIds, voidReason, write: nothing }
    return {
      voidIds,
      voidReason,
      write: { kind: 'update', resultId: same.id, change: status === 'corrected' ? 'result-corrected' : 'result-promoted' },
    }
  }
  return { voidIds, voidReason, write: { kind: 'insert', change: status === 'corrected' ? 'result-corrected' : 'result-added' } }
}

/** Whether an OBX's changes can move the screening: anything but adding a value the screening never reads. */
export function movesScreening(o: ObxReading, changeKinds: readonly string[]): boolean {
  if (changeKinds.some((k) => k !== 'result-added')) return true
  // Preliminary values and values beyond a limit are never screened; nor are tests outside the screening set.
  return (
    changeKinds.length > 0 &&
    o.action !== 'preliminary' &&
    o.comparator === null &&
    (SCREENING_ANALYTES as readonly string[]).includes(o.reading.analyte)
  )
}

/** The row an OBX stores when it brings a new value (both paths write exactly this). */
export function hl7Result(o: ObxReading, ctx: { referralId: number; patientId: number; hl7MessageId: number }): NewResult {
  const r = o.reading
  return {
    referralId: ctx.referralId,
    analyte: r.analyte,
    takenAt: r.takenAt,
    patientId: ctx.patientId,
    valueCanonical: r.valueCanonical,
    valueReported: r.value,
    unitReported: r.unit,
    enteredBy: null,
    source: 'hl7',
    status: o.action as ResultStatus,
    comparator: o.comparator,
    hl7MessageId: ctx.hl7MessageId,
    referenceRange: o.range || null,
    abnormalFlags: o.flags || null,
  }
}

/** The change list's words for a new value, as the message log and the audit row show it. */
export function addedDetail(o: ObxReading): string {
  return `${o.comparator ?? ''}${o.reading.value} ${o.reading.unit}${o.action === 'preliminary' ? ' (preliminary)' : ''}`
}
