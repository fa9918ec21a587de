import type { OutcomeInput } from '../schemas/outcomes'

/** Plausible but unexpected: saved, with a caution for the person entering it. Common practice thresholds. */
export const LOSS_WARNING_MULTIPLE = 3
export const LOW_HB_WARNING_GL = 60
export const LONG_STAY_WARNING_DAYS = 30
export const MANY_UNITS_WARNING = 6

export interface OutcomeWarning {
  field: string
  message: string
}

/** Unit counts come from the transfusion record (derived), the rest from the form. */
type WarningInput = Pick<OutcomeInput, 'bloodLossMl' | 'lowestHbGL' | 'lengthOfStayDays' | 'dischargeHbGL'> & {
  unitsTransfusedIntraOp: number
  unitsTransfusedPostOp: number
}

export function outcomeWarnings(o: WarningInput, usualLossMl: number | null): OutcomeWarning[] {
  const w: OutcomeWarning[] = []
  if (usualLossMl && o.bloodLossMl > LOSS_WARNING_MULTIPLE * usualLossMl) {
    w.push({
      field: 'bloodLossMl',
      message: `Blood loss ${o.bloodLossMl} mL is more than ${LOSS_WARNING_MULTIPLE}× this operation's usual ${usualLossMl} mL`,
    })
  }
  if (o.lowestHbGL < LOW_HB_WARNING_GL)
    w.push({ field: 'lowestHbGL', message: `Lowest Hb ${o.lowestHbGL} g/L is below ${LOW_HB_WARNING_GL} g/L` })
  if (o.dischargeHbGL != null && o.dischargeHbGL < o.lowestHbGL)
    w.push({ field: 'dischargeHbGL', message: 'Hb at discharge is below the lowest Hb recorded' })
  if (o.lengthOfStayDays > LONG_STAY_WARNING_DAYS)
    w.push({ field: 'lengthOfStayDays', message: `Length of stay ${o.lengthOfStayDays} days is over ${LONG_STAY_WARNING_DAYS}` })
  const units = o.unitsTransfusedIntraOp + o.unitsTransfusedPostOp
  if (units > MANY_UNITS_WARNING)
    w.push({ field: 'unitsTransfusedPostOp', message: `${units} units in total is more than ${MANY_UNITS_WARNING}` })
  return w
}
