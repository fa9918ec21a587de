import * as yup from 'yup'
import type { Limit } from '../clinical'
import { isIsoDate, todayIso, addDays } from '../pathway/dates'

/** A number inside a clinical limit, with a message that names the field, range and unit. */
export function numberInLimit(label: string, limit: Limit) {
  const range = `${label} must be between ${limit.min} and ${limit.max} ${limit.unit}`
  return yup.number().typeError(`${label} must be a number in ${limit.unit}`).min(limit.min, range).max(limit.max, range)
}

// The e-mail field lives in its own module: the sign-in page imports it without the date helpers.
export { EMAIL_MAX_LENGTH, emailField } from './email'

/** A calendar date as 'YYYY-MM-DD' (kept as a string: a date of birth has no time zone). */
export function isoDateField(label: string) {
  return yup
    .string()
    .trim()
    .max(10, `${label} must be a real date written YYYY-MM-DD`)
    .test('iso-date', `${label} must be a real date written YYYY-MM-DD`, (v) => v == null || v === '' || isIsoDate(v))
}

type Check = { name: string; message: string; test: (v: string | null | undefined) => boolean }

// "Today" is read at validation time, not when the schema is built (servers run for weeks).
export function notAfterToday(label: string): Check {
  return { name: 'not-future', message: `${label} must not be in the future`, test: (v) => v == null || !isIsoDate(v) || v <= todayIso() }
}

export function notBeforeToday(label: string): Check {
  return { name: 'not-past', message: `${label} must be today or later`, test: (v) => v == null || !isIsoDate(v) || v >= todayIso() }
}

/** Surgery booked years ahead is almost always a typing slip in the year. */
export const MAX_YEARS_AHEAD = 3
export function withinYearsAhead(label: string): Check {
  return {
    name: 'not-far',
    message: `${label} must be within ${MAX_YEARS_AHEAD} years`,
    test: (v) => v == null || !isIsoDate(v) || v <= addDays(todayIso(), 366 * MAX_YEARS_AHEAD),
  }
}

/** Clocks on ward PCs drift; a few minutes ahead is not "in the future". */
export const CLOCK_SKEW_MS = 5 * 60_000

/** A moment (ISO date-time), not later than now. */
export function pastInstantField(label: string) {
  return yup
    .date()
    .typeError(`${label} must be a date and time (ISO 8601)`)
    .min(new Date('1990-01-01T00:00:00Z'), `${label} must be after 1990`)
    .test('not-future', `${label} must not be in the future`, (v) => v == null || v.getTime() <= Date.now() + CLOCK_SKEW_MS)
}

/** Optional free text: empty strings become null so the database holds one kind of "nothing". */
export function optionalText(label: string, max: number) {
  return yup
    .string()
    .trim()
    .max(max, `${label} must be at most ${max} characters`)
    .nullable()
    .transform((v: unknown) => (v === '' ? null : v))
}

export const versionField = yup
  .number()
  .typeError('version must be a whole number')
  .required('version is required (the version you last saw)')
  .integer('version must be a whole number')
  .min(1, 'version must be 1 or more')
