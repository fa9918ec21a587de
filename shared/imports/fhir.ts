import { analyteForLoinc, DERIVED_LOINC, LOINC_SYSTEM } from './codes'
import { checkReading, type Reading } from './rows'
import { appUnitForUcum, UCUM_SYSTEM } from './ucum'

/** FHIR R4 Observation.status values whose result may be acted on (R4 ObservationStatus). */
export const USABLE_STATUSES = ['final', 'amended', 'corrected'] as const

export type FhirEntryCheck =
  | { index: number; fullUrl?: string; kind: 'reading'; reading: Reading }
  | { index: number; fullUrl?: string; kind: 'skip'; reason: string }
  | { index: number; fullUrl?: string; kind: 'invalid'; reason: string }

type Json = Record<string, unknown>
const isObj = (v: unknown): v is Json => typeof v === 'object' && v !== null && !Array.isArray(v)
const str = (v: unknown): string | undefined => (typeof v === 'string' && v.trim() ? v.trim() : undefined)

/** The MRN of a Patient: the identifier typed MR (HL7 v2 table 0203, from memory), else the first. */
function mrnOf(patient: Json): string | undefined {
  const ids = Array.isArray(patient.identifier) ? patient.identifier.filter(isObj) : []
  const typed = ids.find(
    (id) => isObj(id.type) && Array.isArray(id.type.coding) && id.type.coding.some((c: unknown) => isObj(c) && c.code === 'MR'),
  )
  return str((typed ?? ids[0])?.value)
}

// FHIR dateTime with a time SHALL carry a zone; a bare date names no draw time.
const FHIR_INSTANT = /^\d{4}-\d{2}-\d{2}T\d{2}:\d{2}(:\d{2}(\.\d+)?)?(Z|[+-]\d{2}:\d{2})$/

function subjectMrn(obs: Json, patients: Map<string, string>): string | undefined {
  const subject = isObj(obs.subject) ? obs.subject : undefined
  if (!subject) return undefined
  if (isObj(subject.identifier)) return str(subject.identifier.value)
  const ref = str(subject.reference)
  if (!ref) return undefined
  if (ref.startsWith('#')) {
    const contained = Array.isArray(obs.contained) ? obs.contained.filter(isObj) : []
    const p = contained.find((c) => c.resourceType === 'Patient' && c.id === ref.slice(1))
    return p ? mrnOf(p) : undefined
  }
  return patients.get(ref)
}

/**
 * Resources a clinical Bundle carries beside its results (Ferrolane's own episode export holds
 * the last three): reported as skipped, holding no laboratory result, rather than as invalid.
 */
const NOT_RESULTS = [
  'Patient',
  'MedicationAdministration',
  'Appointment',
  'Encounter',
  'Specimen',
  'DiagnosticReport',
  'Practitioner',
  'Organization',
]

function checkObservation(
  obs: Json,
  patients: Map<string, string>,
  now: number,
): { reading: Reading } | { reason: string } | { skip: string } {
  const status = str(obs.status)
  if (!status || !(USABLE_STATUSES as readonly string[]).includes(status)) {
    return { reason: `status must be one of ${USABLE_STATUSES.join(', ')} (got ${status ?? 'nothing'})` }
  }
  const codings = isObj(obs.code) && Array.isArray(obs.code.coding) ? obs.code.coding.filter(isObj) : []
  const loinc = codings.find((c) => c.system === LOINC_SYSTEM)
  if (!loinc) return { reason: `code.coding has no LOINC coding (system ${LOINC_SYSTEM})` }
  const derived = DERIVED_LOINC[String(loinc.code ?? '').trim()]
  if (derived) return { skip: `LOINC ${String(loinc.code)} (${derived}) is worked out by Ferrolane from the creatinine, not imported` }
  const entry = analyteForLoinc(String(loinc.code ?? ''))
  if (!entry) return { reason: `LOINC code ${String(loinc.code ?? '(none)')} is not one Ferrolane imports` }
  const q = isObj(obs.valueQuantity) ? obs.valueQuantity : undefined
  if (!q) return { reason: 'valueQuantity is missing (a result needs a value with a unit)' }
  if (typeof q.value !== 'number' || !Number.isFinite(q.value)) return { reason: 'valueQuantity.value must be a number' }
  if (q.system !== UCUM_SYSTEM || !str(q.code)) return { reason: `valueQuantity must carry a UCUM unit (system ${UCUM_SYSTEM} and a code)` }
  const unit = appUnitForUcum(String(q.code))
  if (!unit) return { reason: `UCUM unit ${String(q.code)} is not one Ferrolane accepts` }
  const when = str(obs.effectiveDateTime)
  if (!when || !FHIR_INSTANT.test(when))
    return { reason: 'effectiveDateTime must be a date and time with a zone (e.g. 2026-01-31T09:30:00Z)' }
  const mrn = subjectMrn(obs, patients)
  if (!mrn)
    return { reason: 'subject must identify the patient (subject.identifier, or a contained or bundled Patient with an identifier)' }
  const checked = checkReading({ mrn, analyte: entry.analyte, unit, value: q.value, takenAt: new Date(when) }, now)
  return checked.ok ? { reading: checked.reading } : { reason: checked.reason }
}

/**
 * Checks a FHIR R4 Bundle of Observations entry by entry. Patient entries may stand in for the
 * subject (referenced by fullUrl or Patient/id). Returns a bundle-level error when the document
 * is not a Bundle at all.
 */
export function checkFhirBundle(bundle: unknown, now: number): { error: string } | { entries: FhirEntryCheck[] } {
  if (!isObj(bundle) || bundle.resourceType !== 'Bundle') return { error: 'the document must be a FHIR R4 Bundle (resourceType "Bundle")' }
  if (!Array.isArray(bundle.entry) || bundle.entry.length === 0) return { error: 'the Bundle has no entries' }
  const entries = bundle.entry as unknown[]
  const patients = new Map<string, string>()
  entries.forEach((e) => {
    if (!isObj(e) || !isObj(e.resource) || e.resource.resourceType !== 'Patient') return
    const mrn = mrnOf(e.resource)
    if (!mrn) return
    if (str(e.fullUrl)) patients.set(str(e.fullUrl)!, mrn)
    if (str(e.resource.id)) patients.set(`Patient/${str(e.resource.id)}`, mrn)
  })
  return {
    entries: entries.map((e, index): FhirEntryCheck => {
      const fullUrl = isObj(e) ? str(e.fullUrl) : undefined
      const base = { index, ...(fullUrl ? { fullUrl } : {}) }
      if (!isObj(e) || !isObj(e.resource)) return { ...base, kind: 'invalid', reason: 'entry has no resource' }
      const type = e.resource.resourceType
      if (type === 'Patient') return { ...base, kind: 'skip', reason: 'Patient resource: identifies the patient, holds no result' }
      if (typeof type === 'string' && NOT_RESULTS.includes(type))
        return { ...base, kind: 'skip', reason: `${type} resource: holds no laboratory result, not imported` }
      if (type !== 'Observation')
        return {
          ...base,
          kind: 'invalid',
          reason: `resource must be an Observation (got ${typeof type === 'string' ? type : 'no resourceType'})`,
        }
      const r = checkObservation(e.resource, patients, now)
      if ('skip' in r) return { ...base, kind: 'skip', reason: r.skip }
      return 'reading' in r ? { ...base, kind: 'reading', reading: r.reading } : { ...base, kind: 'invalid', reason: r.reason }
    }),
  }
}
