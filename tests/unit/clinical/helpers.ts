import { expect } from 'vitest'
import { ClinicalInputError } from '../../../shared/clinical'

/** |actual − expected| ≤ tolerance, with both numbers in the failure message. */
export function expectWithin(actual: number, expected: number, tolerance: number): void {
  expect(Number.isFinite(actual), `expected a finite number, got ${actual}`).toBe(true)
  expect(Math.abs(actual - expected), `got ${actual}, expected ${expected} ± ${tolerance}`).toBeLessThanOrEqual(tolerance)
}

/** Runs fn and returns the ClinicalInputError it throws; fails if it throws nothing or something else. */
export function clinicalError(fn: () => unknown): ClinicalInputError {
  try {
    fn()
  } catch (error) {
    expect(error).toBeInstanceOf(ClinicalInputError)
    return error as ClinicalInputError
  }
  throw new Error('expected a ClinicalInputError, but nothing was thrown')
}

/**
 * mulberry32: a tiny seeded PRNG (public-domain, Tommy Ettinger) so property-style runs are
 * reproducible from the seed printed in a failing test's name.
 */
export function mulberry32(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

export function uniform(rand: () => number, min: number, max: number): number {
  return min + (max - min) * rand()
}

export function pick<T>(rand: () => number, items: readonly T[]): T {
  return items[Math.floor(rand() * items.length)]
}
