import { longDate } from '../../../shared/appointments'
import { convertHb } from '../../../shared/clinical'
import { DECISION_SUPPORT_CAUTION } from '../../../shared/clinic/readiness'
import type { ClinicContact } from '../../mail/snapshot'
import type { LoadedReferral } from '../episode'
import type { LetterFacts, LatestResult } from './facts'
import type { LetterContent } from './pdf'

const noonUtc = (iso: string) => new Date(`${iso}T12:00:00Z`)
// A date of birth is a calendar date: no weekday, no time zone.
const birthDate = (iso: string) =>
  new Intl.DateTimeFormat('en-GB', { timeZone: 'UTC', day: 'numeric', month: 'long', year: 'numeric' }).format(noonUtc(iso))

/**
 * The letter to the family doctor, in Ferrolane's words. Hb is given in g/L (the unit the clinic
 * stores and reads) with g/dL beside it, since practices report either.
 */
export function familyDoctorLetter(
  r: LoadedReferral,
  f: LetterFacts,
  clinic: ClinicContact,
  author: { name: string; roleLabel: string },
  now: Date,
): LetterContent {
  const tz = clinic.timeZone
  const day = (d: Date) => longDate(d, tz)
  const result = (x: LatestResult | null, fmt: (x: LatestResult) => string) =>
    x ? `${fmt(x)} (taken ${day(x.takenAt)})` : 'not measured in this episode'
  const p = r.patient
  const findings = [
    {
      label: 'Haemoglobin',
      value: result(f.hb, (x) => `${x.value} g/L (${Math.round(convertHb(x.value, 'g/L', 'g/dL') * 10) / 10} g/dL)`),
    },
    { label: 'Ferritin', value: result(f.ferritin, (x) => `${x.value} ${x.unit}`) },
    { label: 'Transferrin saturation', value: result(f.tsat, (x) => `${x.value} ${x.unit}`) },
  ]
  const treatment = f.doses.length
    ? f.doses.map((d) => ({
        label: day(d.givenAt),
        value: `${d.productName}, ${d.doseMg} mg${d.route === 'oral' ? ' (oral)' : ' intravenously'}`,
      }))
    : []
  const total = f.doses.reduce((s, d) => s + d.doseMg, 0)
  const plan = [
    { label: 'Operation', value: `${r.procedure.name}, planned for ${day(noonUtc(r.plannedSurgeryDate))}, under ${f.surgeonName}` },
    { label: 'Blood re-check', value: r.recheckDueDate ? `due by ${day(noonUtc(r.recheckDueDate))}` : 'not yet booked' },
    {
      label: 'Readiness',
      value:
        'unavailable' in f.readiness
          ? `no surgery-day projection yet (${f.readiness.unavailable.replace(/^Cannot project surgery day: /, '')})`
          : `${f.readiness.verdict}; predicted Hb on the day of surgery ${f.readiness.predictedSurgeryHbGL} g/L`,
    },
  ]
  return {
    title: 'Pre-operative anaemia: letter to the family doctor',
    date: day(now),
    recipient: ['The family doctor', p.gpPractice ?? 'Practice not recorded on the referral'],
    patient: [
      { label: 'Patient', value: `${p.givenName} ${p.familyName}` },
      { label: 'Date of birth', value: birthDate(p.dateOfBirth) },
      { label: 'Hospital number', value: p.mrn },
    ],
    greeting: 'Dear colleague,',
    sections: [
      { heading: 'What we found', rows: findings },
      {
        heading: 'Diagnosis',
        lines: f.review
          ? [
              `${f.review.diagnosis} (clinic review on ${day(f.review.reviewedAt)}).`,
              ...(f.review.plan ? [`Clinic plan: ${f.review.plan}`] : []),
            ]
          : ['The patient has not yet been reviewed in the anaemia clinic.'],
      },
      {
        heading: 'Treatment given',
        ...(treatment.length
          ? { rows: [...treatment, { label: 'Total', value: `${total} mg of iron` }] }
          : { lines: ['No iron has been given by the clinic so far.'] }),
      },
      { heading: 'Plan', rows: plan },
      {
        heading: 'Who to contact',
        lines: [
          `The ${clinic.service} at ${clinic.name}: telephone ${clinic.phone}, e-mail ${clinic.email}. Please quote the hospital number.`,
        ],
      },
    ],
    closing: ['We will write again if the plan changes. If anything here does not match your records, please call us.'],
    signature: ['Yours sincerely,', author.name, `${author.roleLabel}, ${clinic.service}`],
    caution: `${DECISION_SUPPORT_CAUTION} Figures in this letter were taken from the clinic record on the date above.`,
    clinic,
  }
}
