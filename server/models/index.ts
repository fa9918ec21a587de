import type { Sequelize } from 'sequelize'
import { initUser, User } from './user'
import { initSessionRow, SessionRow } from './session'
import { initAuditEntry, AuditEntry } from './auditEntry'
import { initLoginFailure, LoginFailure } from './loginFailure'
import { initPatient, Patient } from './patient'
import { initPatientMeasurement, PatientMeasurement } from './patientMeasurement'
import { initProcedure, Procedure } from './procedure'
import { initReferral, Referral } from './referral'
import { initResult, Result } from './result'
import { initStageTransition, StageTransition } from './stageTransition'
import { initIronProduct, IronProductRow } from './ironProduct'
import { initClinicSettings, ClinicSettingsRow } from './clinicSettings'
import { initClinicReview, ClinicReview } from './clinicReview'
import { initPrescription, Prescription } from './prescription'
import { initAdministration, Administration } from './administration'
import { initReadinessReview, ReadinessReview } from './readinessReview'

import { initInfusionSession, InfusionSession } from './infusionSession'
import { initAppointment, Appointment } from './appointment'
import { initAppointmentEvent, AppointmentEvent } from './appointmentEvent'
import { initOutboxMessage, OutboxMessage } from './outboxMessage'
import { initAppointmentReplyToken, AppointmentReplyToken } from './appointmentReplyToken'
import { initAppointmentReplyFailure, AppointmentReplyFailure } from './appointmentReplyFailure'
import { initAppointmentTask, AppointmentTask } from './appointmentTask'
import { initOutcome, Outcome } from './outcome'
import { initEpisodeDocument, EpisodeDocument } from './episodeDocument'
import { initLetter, Letter } from './letter'
import { initImportBatch, ImportBatch } from './importBatch'
import { initImportMapping, ImportMapping } from './importMapping'
import { initTransfusion, Transfusion } from './transfusion'
import { initSurgeryDateChange, SurgeryDateChange } from './surgeryDateChange'
import { initRecoveryCode, RecoveryCode } from './recoveryCode'
export { RecoveryCode }
import { initHl7Message, Hl7MessageRow } from './hl7Message'
export { User, SessionRow, AuditEntry, LoginFailure, Patient, PatientMeasurement, Procedure, Referral, Result, StageTransition }
export { IronProductRow, ClinicSettingsRow, ClinicReview, Prescription, Administration, ReadinessReview }

export { Outcome, Transfusion, SurgeryDateChange }
export { EpisodeDocument, Letter }
export { ImportBatch, ImportMapping }
export { Hl7MessageRow }
export { InfusionSession, Appointment, AppointmentEvent, OutboxMessage, AppointmentReplyToken, AppointmentReplyFailure, AppointmentTask }

/**
 * Models are module-level classes bound to one Sequelize instance; a test that builds a
 * second app (to prove sessions survive a restart) rebinds them to its own instance.
 */
export function initModels(sequelize: Sequelize): void {
  initUser(sequelize)
  initRecoveryCode(sequelize)
  initSessionRow(sequelize)
  initAuditEntry(sequelize)
  initLoginFailure(sequelize)
  initPatient(sequelize)
  initPatientMeasurement(sequelize)
  initProcedure(sequelize)
  initReferral(sequelize)
  initResult(sequelize)
  initStageTransition(sequelize)
  initIronProduct(sequelize)
  initClinicSettings(sequelize)
  initClinicReview(sequelize)
  initPrescription(sequelize)
  initAdministration(sequelize)
  initReadinessReview(sequelize)

  initInfusionSession(sequelize)
  initAppointment(sequelize)
  initAppointmentEvent(sequelize)
  initOutboxMessage(sequelize)
  initAppointmentReplyToken(sequelize)
  initAppointmentReplyFailure(sequelize)
  initAppointmentTask(sequelize)
  initOutcome(sequelize)
  initEpisodeDocument(sequelize)
  initLetter(sequelize)
  initImportBatch(sequelize)
  initImportMapping(sequelize)
  initTransfusion(sequelize)
  initSurgeryDateChange(sequelize)
  initHl7Message(sequelize)
  // Associations live here, in one place. Aliases are the names services include by.
  Patient.hasMany(PatientMeasurement, { foreignKey: 'patientId', as: 'measurements' })
  Patient.hasMany(Referral, { foreignKey: 'patientId', as: 'referrals' })
  Referral.belongsTo(Patient, { foreignKey: 'patientId', as: 'patient' })
  Referral.belongsTo(Procedure, { foreignKey: 'procedureId', as: 'procedure' })
  Referral.belongsTo(User, { foreignKey: 'surgeonId', as: 'surgeon' })
  Referral.hasMany(Result, { foreignKey: 'referralId', as: 'results' })
  Referral.hasMany(StageTransition, { foreignKey: 'referralId', as: 'transitions' })
  SurgeryDateChange.belongsTo(User, { foreignKey: 'changedBy', as: 'changedByUser' })
  Result.belongsTo(User, { foreignKey: 'enteredBy', as: 'enteredByUser' })
  StageTransition.belongsTo(User, { foreignKey: 'userId', as: 'user' })
  Referral.hasMany(ClinicReview, { foreignKey: 'referralId', as: 'reviews' })
  ClinicReview.belongsTo(User, { foreignKey: 'reviewedBy', as: 'reviewer' })
  Referral.hasMany(Prescription, { foreignKey: 'referralId', as: 'prescriptions' })
  Prescription.belongsTo(User, { foreignKey: 'prescribedBy', as: 'prescriber' })
  Prescription.hasMany(Administration, { foreignKey: 'prescriptionId', as: 'administrations' })
  Administration.belongsTo(User, { foreignKey: 'givenBy', as: 'giver' })
  Referral.hasMany(ReadinessReview, { foreignKey: 'referralId', as: 'readinessReviews' })
  // Appointments and the patient messages about them.
  Referral.hasMany(Appointment, { foreignKey: 'referralId', as: 'appointments' })
  Appointment.belongsTo(Referral, { foreignKey: 'referralId', as: 'referral' })
  Appointment.belongsTo(Patient, { foreignKey: 'patientId', as: 'patient' })
  Appointment.belongsTo(InfusionSession, { foreignKey: 'infusionSessionId', as: 'session' })
  Appointment.hasMany(AppointmentEvent, { foreignKey: 'appointmentId', as: 'events' })
  Appointment.hasMany(OutboxMessage, { foreignKey: 'appointmentId', as: 'messages' })
  OutboxMessage.belongsTo(Patient, { foreignKey: 'patientId', as: 'patient' })
  AppointmentTask.belongsTo(Appointment, { foreignKey: 'appointmentId', as: 'appointment' })
  AppointmentTask.belongsTo(Patient, { foreignKey: 'patientId', as: 'patient' })
  Referral.hasOne(Outcome, { foreignKey: 'referralId', as: 'outcome' })
  AuditEntry.belongsTo(User, { foreignKey: 'userId', as: 'user', constraints: false })
  EpisodeDocument.belongsTo(User, { foreignKey: 'uploadedBy', as: 'uploader' })
  Letter.belongsTo(EpisodeDocument, { foreignKey: 'documentId', as: 'document' })
  ImportBatch.belongsTo(User, { foreignKey: 'createdBy', as: 'creator' })
  ImportBatch.belongsTo(User, { foreignKey: 'reversedBy', as: 'reverser' })
}
