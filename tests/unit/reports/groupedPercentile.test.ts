import { describe, expect, it } from 'vitest'
import { groupedPercentile } from '../../../server/services/reports/percentile'

// PERCENTILE_CONT (SQL:2003, as MariaDB documents it): the value at rank p × (n − 1) of the sorted
// values, interpolated linearly between its neighbours. Written out here over the full list.
function percentileCont(values: number[], p: number): number | null {
  if (values.length === 0) return null
  const v = [...values].sort((a, b) => a - b)
  const pos = p * (v.length - 1)
  return v[Math.floor(pos)]! + (pos - Math.floor(pos)) * (v[Math.ceil(pos)]! - v[Math.floor(pos)]!)
}

const group = (values: number[]) => {
  const counts = new Map<number, number>()
  for (const v of values) counts.set(v, (counts.get(v) ?? 0) + 1)
  return [...counts.entries()].map(([value, n]) => ({ value, n }))
}

describe('groupedPercentile', () => {
  it('when worked by hand, then 1, 2, 3, 4 gives median 2.5 and 90th centile 3.7', () => {
    // Ranks 0..3: median at 1.5 → (2 + 3) / 2; 90th at 2.7 → 3 + 0.7 × (4 − 3).
    const g = group([4, 1, 3, 2])
    expect(groupedPercentile(g, 0.5)).toBe(2.5)
    expect(groupedPercentile(g, 0.9)).toBeCloseTo(3.7, 10)
  })

  it('when there are no values (or only empty groups), then null', () => {
    expect(groupedPercentile([], 0.5)).toBeNull()
    expect(groupedPercentile([{ value: 3, n: 0 }], 0.9)).toBeNull()
  })

  it('when one group holds every value, then that value', () => {
    expect(groupedPercentile([{ value: -12, n: 25_000 }], 0.9)).toBe(-12)
  })

  it('when many day counts repeat, negative ones included, then it equals PERCENTILE_CONT over the full list', () => {
    let seed = 7
    const rand = () => (seed = (seed * 1103515245 + 12345) % 2 ** 31) / 2 ** 31
    for (let run = 0; run < 200; run++) {
      const values = Array.from({ length: 1 + Math.floor(rand() * 60) }, () => Math.floor(rand() * 40) - 5)
      for (const p of [0, 0.1, 0.5, 0.9, 1]) expect(groupedPercentile(group(values), p)).toBeCloseTo(percentileCont(values, p)!, 10)
    }
  })
})
