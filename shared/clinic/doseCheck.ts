import type { IronProduct } from '../clinical'

export interface PlannedDose {
  doseMg: number
  dayOffset: number
}

export interface CapViolation {
  cap:
    | 'maxSingleDoseMg'
    | 'maxSingleDoseMgPerKg'
    | 'paediatricMaxSingleDoseMg'
    | 'paediatricMaxSingleDoseMgPerKg'
    | 'minIntervalDays'
    | 'maxWeeklyMg'
    | 'maxTotalMg'
    | 'calculatedNeed'
    | 'surgeryDate'
  message: string
}

/**
 * Re-checks a dose schedule against the product's caps (the server runs this on save, so a
 * plan edited after the preview cannot slip past a cap). Each violation names its cap.
 */
export function checkDosesAgainstCaps(
  product: IronProduct,
  weightKg: number,
  doses: PlannedDose[],
  needMg: number,
  opts: { paediatric?: boolean; surgeryDayOffset?: number; needLabel?: string } = {},
): CapViolation[] {
  const out: CapViolation[] = []
  const childPerKg =
    opts.paediatric && product.paediatricMaxSingleDoseMgPerKg !== undefined ? product.paediatricMaxSingleDoseMgPerKg * weightKg : Infinity
  const childMax = opts.paediatric && product.paediatricMaxSingleDoseMg !== undefined ? product.paediatricMaxSingleDoseMg : Infinity
  const sorted = [...doses].sort((a, b) => a.dayOffset - b.dayOffset)
  const perKgLimit = product.maxSingleDoseMgPerKg !== undefined ? product.maxSingleDoseMgPerKg * weightKg : Infinity
  sorted.forEach((d, i) => {
    const n = i + 1
    if (d.doseMg > product.maxSingleDoseMg) {
      out.push({
        cap: 'maxSingleDoseMg',
        message: `Dose ${n} (${d.doseMg} mg) is over the largest single dose of ${product.maxSingleDoseMg} mg for ${product.name}`,
      })
    }
    if (d.doseMg > perKgLimit + 1e-9) {
      out.push({
        cap: 'maxSingleDoseMgPerKg',
        message:
          `Dose ${n} (${d.doseMg} mg) is over ${product.maxSingleDoseMgPerKg} mg/kg (${Math.floor(perKgLimit)} mg at ${weightKg} ` +
          `kg) for ${product.name}`,
      })
    }
    if (d.doseMg > childMax) {
      out.push({
        cap: 'paediatricMaxSingleDoseMg',
        message: `Dose ${n} (${d.doseMg} mg) is over the largest single dose under 18 of ${childMax} mg for ${product.name}`,
      })
    }
    if (d.doseMg > childPerKg + 1e-9) {
      out.push({
        cap: 'paediatricMaxSingleDoseMgPerKg',
        message:
          `Dose ${n} (${d.doseMg} mg) is over ${product.paediatricMaxSingleDoseMgPerKg} mg/kg under 18 (${Math.floor(childPerKg)} ` +
          `mg at ${weightKg} kg) for ${product.name}`,
      })
    }
    if (opts.surgeryDayOffset !== undefined && d.dayOffset >= opts.surgeryDayOffset) {
      out.push({
        cap: 'surgeryDate',
        message:
          `Dose ${n} (day ${d.dayOffset}) falls on or after the planned surgery (day ${opts.surgeryDayOffset}): plan it before, ` +
          `or give it after the operation`,
      })
    }
    const prev = sorted[i - 1]
    if (prev && d.dayOffset - prev.dayOffset < product.minIntervalDays) {
      out.push({
        cap: 'minIntervalDays',
        message:
          `Doses ${n - 1} and ${n} are ${d.dayOffset - prev.dayOffset} days apart; ${product.name} needs at least ` +
          `${product.minIntervalDays}`,
      })
    }
  })
  if (product.maxWeeklyMg !== undefined) {
    for (const start of sorted) {
      const week = sorted
        .filter((d) => d.dayOffset >= start.dayOffset && d.dayOffset < start.dayOffset + 7)
        .reduce((s, d) => s + d.doseMg, 0)
      if (week > product.maxWeeklyMg) {
        out.push({
          cap: 'maxWeeklyMg',
          message: `${week} mg within 7 days from day ${start.dayOffset} is over the weekly maximum of ${product.maxWeeklyMg} mg`,
        })
        break
      }
    }
  }
  const total = sorted.reduce((s, d) => s + d.doseMg, 0)
  if (product.maxTotalMg !== undefined && total > product.maxTotalMg) {
    out.push({ cap: 'maxTotalMg', message: `The course total ${total} mg is over the product's maximum of ${product.maxTotalMg} mg` })
  }
  if (total > needMg) {
    out.push({
      cap: 'calculatedNeed',
      message: `The course total ${total} mg is more than the calculated need of ${needMg} mg (${opts.needLabel ?? 'Ganzoni'})`,
    })
  }
  return out
}

export interface GivenDose {
  doseMg: number
  givenAt: Date
}

const DAY_MS = 86_400_000

/**
 * Re-checks a dose about to be recorded against what was already given: single-dose, mg/kg
 * (and, under 18, the paediatric caps), the interval since the last dose, any 7 days, the
 * product's course maximum and the prescribed total. Each violation names its cap; the
 * caller refuses (422) unless a reason is recorded.
 */
export function checkGivenDose(input: {
  product: IronProduct
  weightKg: number
  paediatric: boolean
  doseMg: number
  givenAt: Date
  /** Earlier doses on this episode (any prescription). */ earlier: GivenDose[]
  /** Earlier doses on this prescription. */ givenOnPrescriptionMg: number
  prescribedTotalMg: number
}): (CapViolation | { cap: 'prescribedTotal'; message: string })[] {
  const { product, doseMg, givenAt } = input
  const single = checkDosesAgainstCaps(product, input.weightKg, [{ doseMg, dayOffset: 0 }], Infinity, { paediatric: input.paediatric })
  // Only the per-dose caps from the schedule check: the week and the course are counted below
  // against what was really given.
  const perDose = new Set(['maxSingleDoseMg', 'maxSingleDoseMgPerKg', 'paediatricMaxSingleDoseMg', 'paediatricMaxSingleDoseMgPerKg'])
  const out: (CapViolation | { cap: 'prescribedTotal'; message: string })[] = single
    .filter((v) => perDose.has(v.cap))
    .map((v) => ({ ...v, message: v.message.replace('Dose 1 ', 'This dose ') }))
  // A dose may be recorded after the fact, between doses already on file: the interval is
  // checked against the nearest dose on each side, and the week against every 7-day window
  // that holds this dose, not only the 7 days before it.
  const t = givenAt.getTime()
  const nearest = (side: -1 | 1) =>
    input.earlier
      .filter((d) => (side < 0 ? d.givenAt.getTime() <= t : d.givenAt.getTime() > t))
      .reduce<GivenDose | null>((a, d) => (!a || Math.abs(d.givenAt.getTime() - t) < Math.abs(a.givenAt.getTime() - t) ? d : a), null)
  if (product.route === 'iv') {
    for (const other of [nearest(-1), nearest(1)]) {
      if (!other) continue
      const days = Math.abs(t - other.givenAt.getTime()) / DAY_MS
      if (days < product.minIntervalDays) {
        const when = other.givenAt.getTime() <= t ? 'before' : 'after'
        out.push({
          cap: 'minIntervalDays',
          message:
            `The nearest dose ${when} this one is ${Number(days.toFixed(1))} days away; ${product.name} needs at least ` +
            `${product.minIntervalDays}`,
        })
        break
      }
    }
  }
  if (product.maxWeeklyMg !== undefined) {
    const all = [...input.earlier, { doseMg, givenAt }]
    const starts = all.map((d) => d.givenAt.getTime()).filter((s0) => s0 <= t && t - s0 < 7 * DAY_MS)
    const week = Math.max(
      ...starts.map((s0) =>
        all.filter((d) => d.givenAt.getTime() >= s0 && d.givenAt.getTime() - s0 < 7 * DAY_MS).reduce((s, d) => s + d.doseMg, 0),
      ),
    )
    if (week > product.maxWeeklyMg)
      out.push({
        cap: 'maxWeeklyMg',
        message: `${week} mg within 7 days is over the weekly maximum of ${product.maxWeeklyMg} mg for ${product.name}`,
      })
  }
  const course = input.givenOnPrescriptionMg + doseMg
  if (product.maxTotalMg !== undefined && course > product.maxTotalMg) {
    out.push({ cap: 'maxTotalMg', message: `The course would reach ${course} mg, over the product's maximum of ${product.maxTotalMg} mg` })
  }
  if (course > input.prescribedTotalMg) {
    out.push({
      cap: 'prescribedTotal',
      message: `The course would reach ${course} mg, over the prescribed total of ${input.prescribedTotalMg} mg`,
    })
  }
  return out
}
