import type { IronDose } from './ironPlan'

const DAY_MS = 86_400_000
/** A first IV dose closer than this to surgery is too late to raise the Hb (local policy). */
export const IV_TOO_LATE_DAYS = 14
/** From this many days before surgery oral iron first is offered (local policy, 6 weeks). */
export const ORAL_FIRST_MIN_DAYS = 42

export const ORAL_FIRST_SOURCE =
  'NICE NG24 (2015) 1.1.2–1.1.3: offer oral iron before surgery for iron-deficiency anaemia; IV iron when the time to surgery ' +
  'is too short for oral iron. The 6-week point is local policy'

export interface SurgeryTiming {
  daysFromFirstDoseToSurgery: number
  /** Doses that would fall on or after the surgery day: left out of the pre-operative plan. */
  afterSurgery: IronDose[]
  firstDoseTooLate: boolean
  oralFirstOffered: boolean
  warnings: string[]
}

const days = (fromIso: string, toIso: string) =>
  Math.round((Date.parse(`${toIso}T00:00:00Z`) - Date.parse(`${fromIso}T00:00:00Z`)) / DAY_MS)

/**
 * How an IV plan sits against the planned surgery date. Doses on or after the surgery day are
 * taken out (with a warning naming each); a first dose under 14 days before surgery carries the
 * "too late" caution; 6 weeks or more offers oral iron first.
 */
export function surgeryTiming(input: {
  doses: IronDose[]
  firstDoseDate: string
  surgeryDate: string
  route: 'iv' | 'oral'
}): SurgeryTiming {
  const lead = days(input.firstDoseDate, input.surgeryDate)
  const warnings: string[] = []
  const afterSurgery = input.doses.filter((d) => d.date !== undefined && d.date >= input.surgeryDate)
  if (afterSurgery.length) {
    const mg = afterSurgery.reduce((s, d) => s + d.doseMg, 0)
    const which = afterSurgery.map((d) => `dose ${d.number} (${d.doseMg} mg, ${d.date})`).join(', ')
    warnings.push(
      `Not planned before surgery: ${which} would fall on or after the planned surgery on ${input.surgeryDate}. ${mg} mg left ` +
        `for after the operation if still needed.`,
    )
  }
  const firstDoseTooLate = input.route === 'iv' && lead < IV_TOO_LATE_DAYS
  if (firstDoseTooLate) {
    warnings.push(
      `The first IV dose is ${Math.max(0, lead)} days before surgery: too late to raise Hb before surgery; consider ` +
        `post-operative iron (local policy: under ${IV_TOO_LATE_DAYS} days).`,
    )
  }
  const oralFirstOffered = input.route === 'iv' && lead >= ORAL_FIRST_MIN_DAYS
  if (oralFirstOffered) {
    warnings.push(
      `Surgery is ${Math.floor(lead / 7)} weeks away: oral iron first is an option if tolerated, with IV iron if it fails ` +
        `(${ORAL_FIRST_SOURCE}).`,
    )
  }
  return { daysFromFirstDoseToSurgery: lead, afterSurgery, firstDoseTooLate, oralFirstOffered, warnings }
}
