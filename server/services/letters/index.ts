import type { Sequelize } from 'sequelize'
import type { Config } from '../../config'
import { Appointment, Letter, Patient, User } from '../../models/index'
import { longDate } from '../../../shared/appointments'
import { ROLE_LABELS } from '../../../shared/roles'
import { clinicContact } from '../../mail/compose'
import { messageContent } from '../../mail/templates/content'
import { snapshotOf } from '../appointmentView'
import { openDocument, referralForAttaching, saveDocument } from '../documents/index'
import type { LoadedReferral } from '../episode'
import type { WrittenLetter } from '../../../shared/documents/views'
import type { Viewer } from '../viewer'
import { NotFound } from '../../errors'
import { appointmentLetter } from './appointment'
import { letterFacts } from './facts'
import { familyDoctorLetter } from './familyDoctor'
import { renderLetterPdf, type LetterContent } from './pdf'

async function authorOf(viewer: Viewer) {
  const u = await User.findByPk(viewer.userId, { attributes: ['name'], raw: true })
  return { name: u?.name ?? 'a member of staff', roleLabel: ROLE_LABELS[viewer.role] }
}

async function storeLetter(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  r: LoadedReferral,
  content: LetterContent,
  letter: { title: string; fileName: string; recipient: 'family-doctor' | 'patient'; appointmentId: number | null; subject: string },
): Promise<WrittenLetter> {
  const author = await authorOf(viewer)
  const bytes = await renderLetterPdf(content, { author: author.name, subject: letter.subject })
  return saveDocument(
    sequelize,
    config,
    viewer,
    r.id,
    { kind: 'letter', title: letter.title, originalName: letter.fileName, mediaType: 'application/pdf', bytes },
    async (t, d) => {
      const l = await Letter.create(
        {
          referralId: r.id,
          documentId: d.id,
          recipient: letter.recipient,
          appointmentId: letter.appointmentId,
          writtenBy: viewer.userId,
          writtenAt: d.uploadedAt,
        },
        { transaction: t },
      )
      return { id: l.id, documentId: d.id }
    },
  )
}

/** Writes the family-doctor letter from the episode as it is now and keeps the PDF on the episode. */
export async function writeFamilyDoctorLetter(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  referralId: number,
): Promise<WrittenLetter> {
  const r = await referralForAttaching(viewer, referralId)
  const clinic = clinicContact(config)
  const now = new Date()
  const content = familyDoctorLetter(r, await letterFacts(r), clinic, await authorOf(viewer), now)
  const stamp = now.toISOString().slice(0, 10)
  return storeLetter(sequelize, config, viewer, r, content, {
    title: `Letter to the family doctor, ${longDate(now, clinic.timeZone)}`,
    fileName: `family-doctor-letter-${r.patient.mrn}-${stamp}.pdf`,
    recipient: 'family-doctor',
    appointmentId: null,
    subject: `Letter about ${r.patient.givenName} ${r.patient.familyName}, ${r.patient.mrn}`,
  })
}

/** A printed letter to the patient about one appointment, in the appointment e-mail's words. */
export async function writeAppointmentLetter(
  sequelize: Sequelize,
  config: Config,
  viewer: Viewer,
  appointmentId: number,
): Promise<WrittenLetter> {
  const a = await Appointment.findByPk(appointmentId, { raw: true })
  if (!a) throw new NotFound('Appointment')
  const r = await referralForAttaching(viewer, a.referralId)
  const patient = (await Patient.findByPk(a.patientId, { raw: true }))!
  const clinic = clinicContact(config)
  const now = new Date()
  const message = messageContent(a.status === 'cancelled' ? 'cancellation' : 'booking', snapshotOf(a, patient), clinic, null)
  const fullName = `${patient.givenName} ${patient.familyName}`
  const content = appointmentLetter(message, { fullName, mrn: patient.mrn }, longDate(now, clinic.timeZone))
  return storeLetter(sequelize, config, viewer, r, content, {
    title: `Letter to the patient: ${message.subject}`,
    fileName: `appointment-letter-${patient.mrn}-${a.id}.pdf`,
    recipient: 'patient',
    appointmentId: a.id,
    subject: `Appointment letter for ${fullName}, ${patient.mrn}`,
  })
}

export async function openLetter(config: Config, viewer: Viewer, letterId: number) {
  const l = await Letter.findByPk(letterId, { raw: true })
  if (!l) throw new NotFound('Letter')
  return openDocument(config, viewer, l.documentId)
}
