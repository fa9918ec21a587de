import { Hl7Message, Hl7Segment } from '@medplum/core'

export type AckCode = 'AA' | 'AE' | 'AR'

/**
 * Why a message was not (or not fully) taken: ERR carries it back to the sender. `hl7Code` is
 * from HL7 v2 table 0357 (from memory: 101 required field missing, 102 data type error,
 * 103 table value not found, 200 unsupported message type, 203 unsupported version id,
 * 204 unknown key identifier, 207 application internal error).
 */
export class Hl7Problem extends Error {
  constructor(
    readonly ack: 'AE' | 'AR',
    readonly code: string,
    message: string,
    readonly hl7Code = '207',
    readonly where: { segment: string; seq?: number; field?: number } = { segment: 'MSH' },
  ) {
    super(message)
  }
}

// Separators in free text would break the segment; the HL7 escape sequences keep them.
const escape = (s: string) =>
  s
    .replace(/\\/g, '\\E\\')
    .replace(/\|/g, '\\F\\')
    .replace(/\^/g, '\\S\\')
    .replace(/&/g, '\\T\\')
    .replace(/~/g, '\\R\\')
    .replace(/[\r\n]+/g, ' ')

/** The ACK for a message: MSA with the code, and ERR (v2.3 ELD in ERR-1, v2.5 fields 2–8) on errors. */
export function buildAck(msg: Hl7Message, code: AckCode, problem?: Hl7Problem): string {
  const ack = msg.buildAck({ ackCode: code })
  const msa = ack.getSegment('MSA')
  if (msa && problem) msa.setField(3, escape(problem.message).slice(0, 80))
  if (!problem) return ack.toString()
  const w = problem.where
  const text = escape(problem.message)
  const location = `${w.segment}^${w.seq ?? 1}^${w.field ?? ''}`
  const err = Hl7Segment.parse(
    [
      'ERR',
      `${location}^${problem.hl7Code}&${text}`,
      location,
      `${problem.hl7Code}^${problem.code}^HL70357`,
      'E',
      problem.code,
      '',
      '',
      text,
    ].join('|'),
    ack.context,
  )
  return new Hl7Message([...ack.segments, err], ack.context).toString()
}

/** An AR for bytes that framed correctly but are not an HL7 message: no control id to answer to. */
export function rejectUnreadable(reason: string): string {
  const now = new Date().toISOString().replace(/[-:T]/g, '').slice(0, 14)
  const text = escape(reason)
  return [
    `MSH|^~\\&|FERROLANE|FERROLANE|||${now}||ACK|FL${Date.now()}|P|2.5.1`,
    `MSA|AR||${text.slice(0, 80)}`,
    `ERR|^^^100&${text}||100^unreadable^HL70357|E|unreadable||||${text}`,
  ].join('\r')
}
