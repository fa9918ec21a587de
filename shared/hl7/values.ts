import { zonedToUtc } from '../appointments/time'

/** HL7 v2 versions whose ORU, SIU and ADT messages Ferrolane reads. */
export const SUPPORTED_VERSIONS = ['2.3', '2.3.1', '2.4', '2.5', '2.5.1'] as const

export const COMPARATORS = ['<', '<=', '>', '>='] as const
export type Comparator = (typeof COMPARATORS)[number]

const PLAIN = /^\s*(<=|>=|<|>)?\s*([-+]?\d+(?:\.\d+)?)\s*$/

/**
 * An OBX-5 value as a number, with a comparator when the laboratory reported a limit ("<5").
 * SN (structured numeric) sends the comparator and the number as two components.
 * Anything else (text, a range, a titre) is not a result Ferrolane can hold: null.
 */
export function readObxValue(valueType: string, first: string, second: string): { value: number; comparator: Comparator | null } | null {
  if (valueType === 'SN') {
    const cmp = first.trim()
    if (cmp && !(COMPARATORS as readonly string[]).includes(cmp)) return null
    if (!/^[-+]?\d+(?:\.\d+)?$/.test(second.trim())) return null
    return { value: Number(second), comparator: (cmp || null) as Comparator | null }
  }
  const m = PLAIN.exec(first)
  if (!m) return null
  return { value: Number(m[2]), comparator: (m[1] ?? null) as Comparator | null }
}

const TS = /^(\d{4})(\d{2})(\d{2})(\d{2})(\d{2})(\d{2})?(?:\.\d{1,4})?([+-]\d{4})?$/

/**
 * An HL7 v2 timestamp (YYYYMMDDHHMM[SS[.S]][+/-ZZZZ]). Without an offset it is the clinic's
 * wall-clock time. A date without a time is refused: results of one sample are matched by their
 * draw time, as in the CSV import.
 */
export function readHl7Timestamp(text: string, timeZone: string): Date | null {
  const m = TS.exec(text.trim())
  if (!m) return null
  const [y, mo, d, h, mi, s] = m.slice(1, 7).map((x) => Number(x ?? 0)) as [number, number, number, number, number, number]
  const probe = new Date(Date.UTC(y, mo - 1, d, h, mi, s))
  if (probe.getUTCMonth() !== mo - 1 || probe.getUTCDate() !== d || h > 23 || mi > 59 || s > 59) return null
  const offset = m[7]
  if (offset) {
    const sign = offset[0] === '-' ? -1 : 1
    const minutes = sign * (Number(offset.slice(1, 3)) * 60 + Number(offset.slice(3, 5)))
    return new Date(probe.getTime() - minutes * 60_000)
  }
  const pad = (n: number) => String(n).padStart(2, '0')
  return new Date(zonedToUtc(`${y}-${pad(mo)}-${pad(d)}`, `${pad(h)}:${pad(mi)}`, timeZone).getTime() + s * 1000)
}

/** An HL7 v2 date (YYYYMMDD, or a timestamp whose date part is used) as YYYY-MM-DD. */
export function readHl7Date(text: string): string | null {
  const m = /^(\d{4})(\d{2})(\d{2})/.exec(text.trim())
  if (!m) return null
  const probe = new Date(Date.UTC(Number(m[1]), Number(m[2]) - 1, Number(m[3])))
  if (probe.getUTCMonth() !== Number(m[2]) - 1) return null
  return `${m[1]}-${m[2]}-${m[3]}`
}

/** OBX-11 result status (HL7 v2 table 0085): what Ferrolane does with each. */
export type ObxAction = 'final' | 'corrected' | 'preliminary' | 'void'
export function obxAction(status: string): ObxAction | null {
  switch (status.trim().toUpperCase()) {
    case 'F':
      return 'final'
    case 'C':
      return 'corrected'
    case 'P':
      return 'preliminary'
    // X: results cannot be obtained; D: delete the record (table 0085, from memory). Both void.
    case 'X':
    case 'D':
      return 'void'
    default:
      return null
  }
}
