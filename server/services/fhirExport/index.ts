import { createHash, randomUUID } from 'node:crypto'
import type { Config } from '../../config'
import { Administration, Appointment, IronProductRow, Prescription, Result } from '../../models/index'
import { FINAL_WHERE } from '../../models/result'
import { KIND_INFO } from '../../../shared/appointments'
import { recordAudit } from '../audit'
import { loadReferral } from '../episode'
import type { Viewer } from '../viewer'
import { appointmentResource, medicationAdministrationResource, observationResource, patientResource, type UrlOf } from './resources'

/**
 * A name-based UUID (RFC 4122 version 5 layout over SHA-1), so the same record has the same
 * urn:uuid in every export from this hospital and a receiver can recognise a repeat.
 */
function stableUuid(namespace: string, name: string): string {
  const h = createHash('sha1').update(`${namespace}|${name}`).digest()
  h[6] = (h[6]! & 0x0f) | 0x50
  h[8] = (h[8]! & 0x3f) | 0x80
  const x = h.subarray(0, 16).toString('hex')
  return `${x.slice(0, 8)}-${x.slice(8, 12)}-${x.slice(12, 16)}-${x.slice(16, 20)}-${x.slice(20, 32)}`
}

/**
 * One episode as a FHIR R4 Bundle of type "collection": the Patient, every result as an
 * Observation, the iron doses given and the appointments. "collection" rather than "document":
 * a document Bundle must open with a Composition that someone attests, and this export is a
 * machine hand-over of records, not a signed clinical document (that is the letter).
 */
export async function exportReferralBundle(config: Config, viewer: Viewer, referralId: number) {
  const r = await loadReferral(viewer, referralId)
  const [results, doses, appointments] = await Promise.all([
    // Not raw: the JSON column (derivedFrom) is parsed only through the model.
    // Observations are exported as final: voided and preliminary values stay out of the hand-over.
    Result.findAll({
      where: { referralId, ...FINAL_WHERE },
      order: [
        ['takenAt', 'ASC'],
        ['id', 'ASC'],
      ],
    }),
    Administration.findAll({
      where: { referralId },
      order: [
        ['givenAt', 'ASC'],
        ['id', 'ASC'],
      ],
      raw: true,
    }),
    Appointment.findAll({
      where: { referralId },
      order: [
        ['startsAt', 'ASC'],
        ['id', 'ASC'],
      ],
      raw: true,
    }),
  ])
  const prescriptions = doses.length
    ? await Prescription.findAll({ where: { referralId }, attributes: ['id', 'productCode', 'route'], raw: true })
    : []
  const products = prescriptions.length
    ? await IronProductRow.findAll({
        where: { code: [...new Set(prescriptions.map((p) => p.productCode))] },
        attributes: ['code', 'name'],
        raw: true,
      })
    : []
  const productName = new Map(products.map((p) => [p.code, p.name]))
  const rxById = new Map(prescriptions.map((p) => [p.id, p]))

  const urlOf: UrlOf = (type, id) => `urn:uuid:${stableUuid(config.patientIdSystem, `${type}/${id}`)}`
  const patientUrl = urlOf('Patient', r.patient.id)
  const patientName = `${r.patient.givenName} ${r.patient.familyName}`
  const entry = [
    { fullUrl: patientUrl, resource: patientResource(r.patient, config.patientIdSystem) },
    ...results.map((x) => ({ fullUrl: urlOf('Observation', x.id), resource: observationResource(x, patientUrl, urlOf) })),
    ...doses.map((d) => {
      const rx = rxById.get(d.prescriptionId)
      const name = rx ? (productName.get(rx.productCode) ?? rx.productCode) : 'Iron (product not recorded)'
      return {
        fullUrl: urlOf('MedicationAdministration', d.id),
        resource: medicationAdministrationResource({ ...d, productName: name, route: rx?.route ?? 'iv' }, patientUrl),
      }
    }),
    ...appointments.map((a) => ({
      fullUrl: urlOf('Appointment', a.id),
      resource: appointmentResource(
        { ...a, kindLabel: KIND_INFO[a.kind].label, cancelReason: a.cancelReason ?? null },
        patientUrl,
        patientName,
      ),
    })),
  ]
  const counts = { observations: results.length, medicationAdministrations: doses.length, appointments: appointments.length }
  await recordAudit(null, viewer, {
    action: 'export',
    entity: 'referral',
    entityId: referralId,
    patientId: r.patientId,
    after: { format: 'FHIR R4 Bundle', ...counts },
  })
  return {
    resourceType: 'Bundle',
    identifier: { system: 'urn:ietf:rfc:3986', value: `urn:uuid:${randomUUID()}` },
    type: 'collection',
    timestamp: new Date().toISOString(),
    entry,
  }
}
