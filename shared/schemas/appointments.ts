import * as yup from 'yup'
import { APPOINTMENT_KINDS } from '../appointments/kinds'
import { MESSAGE_STATUSES } from '../appointments/kinds'
import { isoDateField, optionalText, versionField, CLOCK_SKEW_MS } from './fields'

const id = (label: string) =>
  yup
    .number()
    .typeError(`${label} must be a whole number`)
    .integer(`${label} must be a whole number`)
    .min(1, `${label} must be a whole number`)

// An instant must carry its offset ("Z" or "+01:00"): a bare "09:30" would depend on the server's clock zone.
const WITH_OFFSET = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/
const MAX_AHEAD_MS = 2 * 366 * 86_400_000

const startsAt = yup
  .string()
  .trim()
  .max(40, 'startsAt must be a date and time with its offset, e.g. 2026-05-12T09:30:00+01:00')
  .test(
    'iso-instant',
    'startsAt must be a date and time with its offset, e.g. 2026-05-12T09:30:00+01:00',
    (v) => v == null || (WITH_OFFSET.test(v) && !Number.isNaN(Date.parse(v))),
  )
  .test('future', 'startsAt must be in the future', (v) => v == null || !WITH_OFFSET.test(v) || Date.parse(v) > Date.now() - CLOCK_SKEW_MS)
  .test(
    'not-far',
    'startsAt must be within two years',
    (v) => v == null || !WITH_OFFSET.test(v) || Date.parse(v) < Date.now() + MAX_AHEAD_MS,
  )
const durationMin = yup
  .number()
  .typeError('durationMin must be a whole number of minutes')
  .integer('durationMin must be a whole number of minutes')
  .min(5, 'durationMin must be between 5 and 480 minutes')
  .max(480, 'durationMin must be between 5 and 480 minutes')
const location = yup.string().trim().min(2, 'location must be at least 2 characters').max(200, 'location must be at most 200 characters')

export const createAppointmentSchema = yup.object({
  referralId: id('referralId').required('referralId is required'),
  kind: yup
    .string()
    .oneOf([...APPOINTMENT_KINDS], `kind must be one of ${APPOINTMENT_KINDS.join(', ')}`)
    .required('kind is required'),
  startsAt: startsAt.required('startsAt is required'),
  durationMin: durationMin.required('durationMin is required'),
  location: location.required('location is required (where the patient should go)'),
})
export type CreateAppointmentInput = yup.InferType<typeof createAppointmentSchema>

export const moveAppointmentSchema = yup
  .object({ version: versionField, startsAt, durationMin, location })
  .test(
    'something-to-change',
    'Send at least one of startsAt, durationMin or location besides version',
    (v) => v.startsAt !== undefined || v.durationMin !== undefined || v.location !== undefined,
  )
export type MoveAppointmentInput = yup.InferType<typeof moveAppointmentSchema>

export const cancelAppointmentSchema = yup.object({
  reason: yup
    .string()
    .trim()
    .min(3, 'reason must say briefly why (at least 3 characters)')
    .max(500, 'reason must be at most 500 characters')
    .required('reason is required'),
})
export type CancelAppointmentInput = yup.InferType<typeof cancelAppointmentSchema>

const HHMM = /^([01]\d|2[0-3]):[0-5]\d$/
const hhmm = (label: string) => yup.string().trim().matches(HHMM, `${label} must be a 24-hour time HH:MM`)
const chairs = yup
  .number()
  .typeError('chairs must be a whole number')
  .integer('chairs must be a whole number')
  .min(1, 'chairs must be between 1 and 40')
  .max(40, 'chairs must be between 1 and 40')

export const createInfusionSessionSchema = yup
  .object({
    date: isoDateField('date').required('date is required'),
    startTime: hhmm('startTime').required('startTime is required'),
    endTime: hhmm('endTime').required('endTime is required'),
    chairs: chairs.required('chairs is required'),
    location: location.required('location is required'),
  })
  .test('order', function (v) {
    return (
      !v.startTime ||
      !v.endTime ||
      v.startTime < v.endTime ||
      this.createError({ path: 'endTime', message: 'endTime must be after startTime' })
    )
  })
export type CreateInfusionSessionInput = yup.InferType<typeof createInfusionSessionSchema>

export const updateInfusionSessionSchema = yup
  .object({ version: versionField, date: isoDateField('date'), startTime: hhmm('startTime'), endTime: hhmm('endTime'), chairs, location })
  .test('something-to-change', 'Send at least one field to change besides version', (v) =>
    Object.entries(v).some(([k, x]) => k !== 'version' && x !== undefined),
  )
export type UpdateInfusionSessionInput = yup.InferType<typeof updateInfusionSessionSchema>

export const sessionRangeSchema = yup
  .object({
    from: isoDateField('from'),
    to: isoDateField('to'),
  })
  .test('window', function (v) {
    return !v.from || !v.to || v.from <= v.to || this.createError({ path: 'to', message: 'to must be on or after from' })
  })
export type SessionRangeQuery = yup.InferType<typeof sessionRangeSchema>

export const outboxQuerySchema = yup.object({
  status: yup.string().oneOf([...MESSAGE_STATUSES], `status must be one of ${MESSAGE_STATUSES.join(', ')}`),
  referralId: id('referralId'),
})
export type OutboxQuery = yup.InferType<typeof outboxQuerySchema>

export const taskQuerySchema = yup.object({
  status: yup.string().oneOf(['open', 'done'], 'status must be open or done').default('open'),
})
export type TaskQuery = yup.InferType<typeof taskQuerySchema>

export const rebookRequestSchema = yup.object({
  message: optionalText('Your message', 1000),
})
export type RebookRequestInput = yup.InferType<typeof rebookRequestSchema>
