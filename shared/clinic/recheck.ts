import { addDays, dateInZone } from '../pathway/dates'

/**
 * The day the re-check Hb is due: `daysAfter` days (ClinicSettings.recheckDaysAfterLastDose,
 * default 28 per the ferric carboxymaltose product information) after the clinic's calendar
 * day of the last dose. Counting from the UTC day would move it a day early for a dose given
 * just after midnight in a zone ahead of UTC.
 */
export function recheckDueOn(givenAt: Date | string, timeZone: string, daysAfter: number): string {
  return addDays(dateInZone(givenAt, timeZone), daysAfter)
}
