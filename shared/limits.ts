import { daysBetween } from './pathway/dates'

/**
 * Upper bounds on the work one request may ask for (ASVS 11.1.4, 12.1.1). Each is named in the
 * 400 that refuses it. Sized well above any real use (common practice), so only a mistake or an
 * attack meets them.
 */
export const LIMITS = {
  /** Doses in one prescription: a year of weekly doses; real IV courses have one to a few. */
  prescriptionDoses: 52,
  /** Readiness board window: a year of operations. */
  readinessDays: 366,
  /** Report period: three years. */
  reportDays: 1096,
  /** Audit trail search window: a year. */
  auditDays: 366,
  /** Infusion-session calendar window: about a quarter. */
  infusionSessionDays: 92,
  /** Worklist page number (100 a page: far past any real list). */
  worklistPage: 1000,
  /** Data rows in one laboratory CSV upload. */
  csvRows: 250_000,
  /** Entries in one FHIR Bundle upload. */
  fhirEntries: 20_000,
  /** The source's own test codes in one column mapping (a laboratory has a few dozen at most). */
  mappingCodes: 500,
  /** Characters in one test code of a mapping. */
  mappingCodeLength: 40,
} as const

/**
 * The message for a date window longer than `maxDays` (inclusive of both ends), or null.
 * `what` names the window in the message, e.g. "The report period".
 */
export function windowTooLong(from: string, to: string, maxDays: number, what: string): string | null {
  return daysBetween(from, to) + 1 > maxDays
    ? `${what} from ${from} to ${to} is longer than the limit of ${maxDays} days; choose a shorter one`
    : null
}
