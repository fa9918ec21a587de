import type { IronProduct } from '../clinical'

export interface PlannedDose { doseMg: number; dayOffset: number }

export interface CapViolation {
  cap: 'maxSingleDoseMg' | 'maxSingleDoseMgPerKg' | 'minIntervalDays' | 'maxWeeklyMg' | 'maxTotalMg' | 'calculatedNeed'
  message: string
}

/**
 * Re-checks a dose schedule against the product's caps (the server runs this on save, so a
 * plan edited after the preview cannot slip past a cap). Each violation names its cap.
 */
export function checkDosesAgainstCaps(product: IronProduct, weightKg: number, doses: PlannedDose[], needMg: number): CapViolation[] {
  const out: CapViolation[] = []
  const sorted = [...doses].sort((a, b) => a.dayOffset - b.dayOffset)
  const perKgLimit = product.maxSingleDoseMgPerKg !== undefined ? product.maxSingleDoseMgPerKg * weightKg : Infinity
  sorted.forEach((d, i) => {
    const n = i + 1
    if (d.doseMg > product.maxSingleDoseMg) {
      out.push({ cap: 'maxSingleDoseMg', message: `Dose ${n} (${d.doseMg} mg) is over the largest single dose of ${product.maxSingleDoseMg} mg for ${product.name}` })
    }
    if (d.doseMg > perKgLimit + 1e-9) {
      out.push({ cap: 'maxSingleDoseMgPerKg', message: `Dose ${n} (${d.doseMg} mg) is over ${product.maxSingleDoseMgPerKg} mg/kg (${Math.floor(perKgLimit)} mg at ${weightKg} kg) for ${product.name}` })
    }
    const prev = sorted[i - 1]
    if (prev && d.dayOffset - prev.dayOffset < product.minIntervalDays) {
      out.push({ cap: 'minIntervalDays', message: `Doses ${n - 1} and ${n} are ${d.dayOffset - prev.dayOffset} days apart; ${product.name} needs at least ${product.minIntervalDays}` })
    }
  })
  if (product.maxWeeklyMg !== undefined) {
    for (const start of sorted) {
      const week = sorted.filter((d) => d.dayOffset >= start.dayOffset && d.dayOffset < start.dayOffset + 7).reduce((s, d) => s + d.doseMg, 0)
      if (week > product.maxWeeklyMg) {
        out.push({ cap: 'maxWeeklyMg', message: `${week} mg within 7 days from day ${start.dayOffset} is over the weekly maximum of ${product.maxWeeklyMg} mg` })
        break
      }
    }
  }
  const total = sorted.reduce((s, d) => s + d.doseMg, 0)
  if (product.maxTotalMg !== undefined && total > product.maxTotalMg) {
    out.push({ cap: 'maxTotalMg', message: `The course total ${total} mg is over the product's maximum of ${product.maxTotalMg} mg` })
  }
  if (total > needMg) {
    out.push({ cap: 'calculatedNeed', message: `The course total ${total} mg is more than the calculated need of ${needMg} mg (Ganzoni)` })
  }
  return out
}
