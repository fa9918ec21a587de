import type { Hl7Message, Hl7Segment } from '@medplum/core'
import { analyteForCode, analyteForLoinc, appUnitForUcum, checkReading, DERIVED_LOINC, type Reading } from '../../../shared/imports'
import { obxAction, readHl7Timestamp, readObxValue, type Comparator, type ObxAction } from '../../../shared/hl7'
import { Hl7Problem } from './ack'

/** One OBX, checked by the rules typed-in and imported results meet. */
export interface ObxReading {
  seq: number
  action: ObxAction
  reading: Reading
  comparator: Comparator | null
  range: string
  flags: string
}

export interface OruGroup {
  mrn: string
  obx: ObxReading[]
}

/**
 * The hospital number from PID-3: the repetition whose assigning authority is ours (or, when a
 * sender names none, the one typed MR). An identifier from another authority is never taken
 * for ours: the same digits may be another hospital's patient.
 */
export function mrnFromPid(pid: Hl7Segment, authority: string): string {
  const field = pid.getField(3)
  const reps = field ? field.components : []
  const ours = reps.find((c) => (c[3] ?? '').split('&')[0]!.trim().toUpperCase() === authority.toUpperCase() && (c[0] ?? '').trim())
  if (ours) return ours[0]!.trim()
  const unnamed = reps.find((c) => !(c[3] ?? '').trim() && (c[4] ?? '').trim().toUpperCase() === 'MR' && (c[0] ?? '').trim())
  if (unnamed) return unnamed[0]!.trim()
  const named = reps.map((c) => (c[3] ?? '').split('&')[0]!.trim()).filter(Boolean)
  if (named.length)
    throw new Hl7Problem('AE', 'unknown-authority', `PID-3 names assigning authority ${named.join(', ')}, not ${authority}`, '204', {
      segment: 'PID',
      field: 3,
    })
  throw new Hl7Problem('AR', 'missing-mrn', 'PID-3 carries no hospital number (MRN)', '101', { segment: 'PID', field: 3 })
}

function readObx(
  obx: Hl7Segment,
  obrTakenAt: string,
  ctx: { codes: Record<string, string>; timeZone: string; now: number; seq: number },
): ObxReading | null {
  const where = (field: number) => ({ segment: 'OBX', seq: ctx.seq, field })
  const status = obx.getComponent(11, 1)
  const action = obxAction(status)
  if (!action)
    throw new Hl7Problem(
      'AE',
      'unsupported-status',
      `OBX-11 status "${status}" is not one Ferrolane takes (F, C, P, X or D)`,
      '103',
      where(11),
    )
  const code = obx.getComponent(3, 1).trim()
  const system = obx.getComponent(3, 3).trim().toUpperCase()
  if (system === 'LN' && DERIVED_LOINC[code]) return null // eGFR: Ferrolane works it out from the creatinine
  const analyte = system === 'LN' ? analyteForLoinc(code)?.analyte : analyteForCode(code, ctx.codes)
  if (!analyte)
    throw new Hl7Problem(
      'AE',
      'unknown-code',
      `OBX-3 code "${code}"${system ? ` (${system})` : ''} is not one Ferrolane takes, nor mapped for this laboratory`,
      '103',
      where(3),
    )
  const takenText = obx.getComponent(14, 1) || obrTakenAt
  const takenAt = readHl7Timestamp(takenText, ctx.timeZone)
  if (!takenAt)
    throw new Hl7Problem('AE', 'bad-date', `time taken "${takenText}" (OBX-14 or OBR-7) is not an HL7 date and time`, '102', where(14))
  const unitCode = obx.getComponent(6, 1).trim()
  const unitSystem = obx.getComponent(6, 3).trim().toUpperCase()
  const unit = (unitSystem === 'UCUM' || unitSystem === '' ? appUnitForUcum(unitCode) : undefined) ?? unitCode
  const value = readObxValue(obx.getComponent(2, 1).trim().toUpperCase(), obx.getComponent(5, 1), obx.getComponent(5, 2))
  if (action === 'void') {
    // A deletion names the test and sample; its value may be empty.
    return {
      seq: ctx.seq,
      action,
      comparator: null,
      range: '',
      flags: '',
      reading: {
        mrn: '',
        analyte,
        unit,
        value: value?.value ?? 0,
        valueCanonical: 0,
        takenAt: new Date(Math.floor(takenAt.getTime() / 1000) * 1000),
      },
    }
  }
  if (!value)
    throw new Hl7Problem('AE', 'implausible-value', `OBX-5 value "${obx.getField(5)?.toString() ?? ''}" is not a number`, '102', where(5))
  const checked = checkReading({ mrn: '', analyte, unit, value: value.value, takenAt }, ctx.now)
  if (!checked.ok)
    throw new Hl7Problem(
      'AE',
      checked.code,
      checked.reason,
      checked.code === 'unknown-unit' ? '103' : '102',
      where(checked.code === 'unknown-unit' ? 6 : checked.code === 'bad-date' ? 14 : 5),
    )
  // OBX-7 and OBX-8 are kept as the laboratory sent them (OBX-8 may repeat: "L~A"), cut to their columns.
  const range = (obx.getField(7)?.toString() ?? '').trim().slice(0, 60)
  const flags = (obx.getField(8)?.toString() ?? '').trim().slice(0, 20)
  return { seq: ctx.seq, action, reading: checked.reading, comparator: value.comparator, range, flags }
}

/**
 * Every patient group of an ORU^R01 (PID, then its OBR and OBX segments), each OBX checked.
 * The first problem stops the message: nothing of it is stored, so a message is all or nothing.
 */
export function readOru(
  msg: Hl7Message,
  ctx: { authority: string; codes: Record<string, string>; timeZone: string; now: number },
): OruGroup[] {
  const groups: OruGroup[] = []
  let obrTakenAt = ''
  let obxSeq = 0
  for (const seg of msg.segments) {
    if (seg.name === 'PID') {
      groups.push({ mrn: mrnFromPid(seg, ctx.authority), obx: [] })
      obrTakenAt = ''
    } else if (seg.name === 'OBR') {
      obrTakenAt = seg.getComponent(7, 1)
    } else if (seg.name === 'OBX') {
      obxSeq += 1
      const group = groups[groups.length - 1]
      if (!group) throw new Hl7Problem('AR', 'segment-order', 'OBX before any PID segment', '100', { segment: 'OBX', seq: obxSeq })
      const r = readObx(seg, obrTakenAt, { ...ctx, seq: obxSeq })
      if (r) group.obx.push({ ...r, reading: { ...r.reading, mrn: group.mrn } })
    }
  }
  if (!groups.length) throw new Hl7Problem('AR', 'missing-pid', 'the message has no PID segment', '100', { segment: 'PID' })
  if (!groups.some((g) => g.obx.length))
    throw new Hl7Problem('AR', 'missing-obx', 'the message has no OBX result', '100', { segment: 'OBX' })
  return groups
}
