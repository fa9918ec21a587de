import type { AppointmentStatus } from '../../../shared/appointments'
import type { StoredAnalyte } from '../../../shared/pathway'
import { LOINC_SYSTEM, UCUM_SYSTEM, loincValue } from '../../../shared/fhir/loinc'

/**
 * FHIR R4 resources built from plain rows. Pure: the service loads the rows and audits; this
 * file only says how each row is written in FHIR (http://hl7.org/fhir/R4).
 */
type Json = Record<string, unknown>

export interface PatientFacts {
  id: number
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: 'female' | 'male'
}
export interface ResultFacts {
  id: number
  analyte: StoredAnalyte
  valueCanonical: number
  unitCanonical: string
  takenAt: Date
  createdAt: Date
  derivedFrom: number[] | null
  source: string
  status?: string
}
export interface DoseFacts {
  id: number
  doseMg: number
  givenAt: Date
  productName: string
  route: 'iv' | 'oral'
  batchNumber: string
}
export interface AppointmentFacts {
  id: number
  kindLabel: string
  status: AppointmentStatus
  startsAt: Date
  endsAt: Date
  durationMin: number
  location: string
  cancelReason: string | null
}

/** Entries refer to each other by these urn:uuid full URLs (the Bundle has no server base). */
export type UrlOf = (type: string, id: number) => string

const V2_0203 = 'http://terminology.hl7.org/CodeSystem/v2-0203'
const OBS_CATEGORY = 'http://terminology.hl7.org/CodeSystem/observation-category'
// FHIR R4 MedicationAdministration.dosage.route example codes are SNOMED CT (from memory:
// 47625008 intravenous route, 26643006 oral route).
const SNOMED = 'http://snomed.info/sct'
const ROUTES = { iv: { code: '47625008', display: 'Intravenous route' }, oral: { code: '26643006', display: 'Oral route' } } as const

export function patientResource(p: PatientFacts, identifierSystem: string): Json {
  return {
    resourceType: 'Patient',
    id: `patient-${p.id}`,
    identifier: [
      {
        use: 'usual',
        type: { coding: [{ system: V2_0203, code: 'MR', display: 'Medical record number' }], text: 'Hospital number' },
        system: identifierSystem,
        value: p.mrn,
      },
    ],
    name: [{ use: 'official', family: p.familyName, given: [p.givenName], text: `${p.givenName} ${p.familyName}` }],
    gender: p.sex,
    birthDate: p.dateOfBirth,
  }
}

export function observationResource(r: ResultFacts, patientUrl: string, urlOf: UrlOf): Json {
  const { entry, value } = loincValue(r.analyte, r.valueCanonical)
  const converted = entry.fromCanonical
    ? [
        {
          text:
            `Stored in Ferrolane as ${r.valueCanonical} ${r.unitCanonical}; converted to ${entry.unit} to match the LOINC code's ` +
            `property.`,
        },
      ]
    : []
  const derived = r.source === 'derived' ? [{ text: 'Calculated by Ferrolane from the results it is derived from.' }] : []
  return {
    resourceType: 'Observation',
    id: `observation-${r.id}`,
    // FHIR R4 Observation.status: a value the laboratory corrected says so.
    status: r.status === 'corrected' ? 'corrected' : 'final',
    category: [{ coding: [{ system: OBS_CATEGORY, code: 'laboratory', display: 'Laboratory' }] }],
    code: { coding: [{ system: LOINC_SYSTEM, code: entry.code, display: entry.display }], text: entry.display },
    subject: { reference: patientUrl },
    effectiveDateTime: r.takenAt.toISOString(),
    issued: r.createdAt.toISOString(),
    valueQuantity: { value, unit: entry.unit, system: UCUM_SYSTEM, code: entry.ucum },
    ...(r.derivedFrom?.length ? { derivedFrom: r.derivedFrom.map((id) => ({ reference: urlOf('Observation', id) })) } : {}),
    ...(converted.length || derived.length ? { note: [...derived, ...converted] } : {}),
  }
}

export function medicationAdministrationResource(d: DoseFacts, patientUrl: string): Json {
  const route = ROUTES[d.route]
  return {
    resourceType: 'MedicationAdministration',
    id: `administration-${d.id}`,
    status: 'completed',
    medicationCodeableConcept: { text: d.productName },
    subject: { reference: patientUrl },
    effectiveDateTime: d.givenAt.toISOString(),
    note: [{ text: `Batch ${d.batchNumber}` }],
    dosage: {
      route: { coding: [{ system: SNOMED, code: route.code, display: route.display }], text: route.display },
      dose: { value: d.doseMg, unit: 'mg', system: UCUM_SYSTEM, code: 'mg' },
    },
  }
}

/**
 * Ferrolane's appointment states in FHIR terms. A visit the patient asked to move is "pending"
 * (a participant has not accepted the time) and the patient's participation is "declined".
 */
export const APPOINTMENT_STATUS_TO_FHIR: Record<AppointmentStatus, { status: string; participant: string }> = {
  booked: { status: 'booked', participant: 'needs-action' },
  confirmed: { status: 'booked', participant: 'accepted' },
  'rebook-requested': { status: 'pending', participant: 'declined' },
  cancelled: { status: 'cancelled', participant: 'declined' },
}

export function appointmentResource(a: AppointmentFacts, patientUrl: string, patientName: string): Json {
  const mapped = APPOINTMENT_STATUS_TO_FHIR[a.status]
  return {
    resourceType: 'Appointment',
    id: `appointment-${a.id}`,
    status: mapped.status,
    ...(a.status === 'cancelled' && a.cancelReason ? { cancelationReason: { text: a.cancelReason } } : {}),
    description: `${a.kindLabel}, ${a.location}`,
    start: a.startsAt.toISOString(),
    end: a.endsAt.toISOString(),
    minutesDuration: a.durationMin,
    participant: [{ actor: { reference: patientUrl, display: patientName }, required: 'required', status: mapped.participant }],
  }
}
