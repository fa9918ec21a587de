import type { Limit } from './limits'
import type { Sex } from './types'

/**
 * Thrown when an input is missing, not a finite number, or outside its accepted range.
 * The message names the input, the value received, the accepted range and the unit, so the
 * server can pass it straight to the user ("hbGL must be between 20 and 250 g/L (got 2)").
 */
export class ClinicalInputError extends Error {
  override readonly name = 'ClinicalInputError'
  readonly input: string
  readonly value: unknown

  constructor(input: string, value: unknown, message: string) {
    super(message)
    this.input = input
    this.value = value
  }
}

function show(value: unknown): string {
  if (typeof value === 'string') return JSON.stringify(value)
  if (value instanceof Date) return Number.isNaN(value.getTime()) ? 'Invalid Date' : value.toISOString()
  return String(value)
}

/** A finite number inside the inclusive limit, or throws with the range and unit. */
export function requireInRange(input: string, value: unknown, limit: Limit): number {
  const range = `${input} must be between ${limit.min} and ${limit.max} ${limit.unit}`
  if (typeof value !== 'number' || !Number.isFinite(value) || value < limit.min || value > limit.max) {
    throw new ClinicalInputError(input, value, `${range} (got ${show(value)})`)
  }
  return value
}

/** Like requireInRange, but undefined/null pass through as undefined. */
export function optionalInRange(input: string, value: unknown, limit: Limit): number | undefined {
  if (value === undefined || value === null) return undefined
  return requireInRange(input, value, limit)
}

/** Whole number inside the limit (day counts, dose steps). */
export function requireIntegerInRange(input: string, value: unknown, limit: Limit): number {
  const n = requireInRange(input, value, limit)
  if (!Number.isInteger(n)) {
    throw new ClinicalInputError(input, value, `${input} must be a whole number of ${limit.unit} (got ${show(value)})`)
  }
  return n
}

/**
 * A saturation as a fraction 0–1. Values between 1 and 100 are almost always a percentage
 * typed into a fraction field; entered unchecked they inflate O2 content about 100-fold,
 * so the message says so explicitly.
 */
export function requireSaturation(input: string, value: unknown): number {
  if (typeof value === 'number' && Number.isFinite(value) && value > 1 && value <= 100) {
    throw new ClinicalInputError(
      input,
      value,
      `${input} must be a fraction between 0 and 1 (got ${value}); it looks like a percentage — divide by 100`,
    )
  }
  return requireInRange(input, value, { min: 0, max: 1, unit: '(fraction)' })
}

export function requireSex(input: string, value: unknown): Sex {
  if (value !== 'female' && value !== 'male') {
    throw new ClinicalInputError(input, value, `${input} must be 'female' or 'male' (got ${show(value)})`)
  }
  return value
}

/** One of a fixed set of option strings. */
export function requireOneOf<T extends string>(input: string, value: unknown, options: readonly T[]): T {
  if (typeof value !== 'string' || !(options as readonly string[]).includes(value)) {
    const list = options.map((o) => `'${o}'`).join(', ')
    throw new ClinicalInputError(input, value, `${input} must be one of ${list} (got ${show(value)})`)
  }
  return value as T
}

/** A Date or a parseable date string; returns epoch milliseconds. */
export function requireDate(input: string, value: unknown): number {
  const ms = value instanceof Date ? value.getTime() : typeof value === 'string' ? Date.parse(value) : Number.NaN
  if (!Number.isFinite(ms)) {
    throw new ClinicalInputError(input, value, `${input} must be a valid date (a Date or an ISO date string) (got ${show(value)})`)
  }
  return ms
}
