import type { Sequelize } from 'sequelize'
import { Administration, Prescription, Referral, User } from '../models/index'
import { addDays, findMove, isReadOnly } from '../../shared/pathway'
import type { AdministrationInput } from '../../shared/schemas/clinic'
import type { Reaction } from '../models/administration'
import { recordAudit } from './audit'
import { getClinicSettings } from './clinicSettings'
import { loadReferral } from './episode'
import { findProduct, toIronProduct } from './formulary'
import { recordMove } from './transitions'
import { currentBody } from './patients'
import { isoOrNull, type Viewer } from './viewer'
import { NotFound, RuleRefused } from '../errors'

const DAY_MS = 86_400_000

export function toAdministrationView(a: Administration & { giver?: User | null }) {
  return {
    id: a.id, prescriptionId: a.prescriptionId, doseMg: a.doseMg, givenAt: isoOrNull(a.givenAt), batchNumber: a.batchNumber,
    reaction: a.reaction, reactionNotes: a.reactionNotes, giver: a.giver ? { id: a.giver.id, name: a.giver.name } : null,
  }
}

/**
 * Records a dose given. The dose is checked against the product's single-dose caps and the
 * interval since the last dose; the episode moves to treating where the pathway table allows
 * this role that move, and the re-check is scheduled
 * the clinic's configured number of days after this (the latest) dose.
 */
export async function recordAdministration(sequelize: Sequelize, viewer: Viewer, referralId: number, input: AdministrationInput) {
  const settings = await getClinicSettings()
  return sequelize.transaction(async (t) => {
    const r = await loadReferral(viewer, referralId, t, true)
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const p = await Prescription.findOne({ where: { id: input.prescriptionId, referralId }, transaction: t })
    if (!p) throw new NotFound('Prescription on this episode')
    if (p.status !== 'active') throw new RuleRefused(`This prescription is ${p.status}; record doses against the active one`, 'prescription_not_active')
    const product = toIronProduct(await findProduct(p.productCode))
    const givenAt = new Date(input.givenAt)
    const body = await currentBody(r.patientId, t)
    const weight = body.weightKg ?? p.weightKg
    const perKg = product.maxSingleDoseMgPerKg !== undefined ? product.maxSingleDoseMgPerKg * weight : Infinity
    if (input.doseMg > product.maxSingleDoseMg) {
      throw new RuleRefused(`${input.doseMg} mg is over the largest single dose of ${product.maxSingleDoseMg} mg for ${product.name}`, 'dose_over_cap', { doseMg: 'over maxSingleDoseMg' })
    }
    if (input.doseMg > perKg + 1e-9) {
      throw new RuleRefused(`${input.doseMg} mg is over ${product.maxSingleDoseMgPerKg} mg/kg (${Math.floor(perKg)} mg at ${weight} kg) for ${product.name}`, 'dose_over_cap', { doseMg: 'over maxSingleDoseMgPerKg' })
    }
    const previous = await Administration.findOne({ where: { referralId }, order: [['givenAt', 'DESC']], transaction: t })
    if (previous && product.route === 'iv') {
      const days = (givenAt.getTime() - previous.givenAt.getTime()) / DAY_MS
      if (days < product.minIntervalDays) {
        throw new RuleRefused(`The last dose was ${Math.max(0, Math.floor(days))} days before this one; ${product.name} needs at least ${product.minIntervalDays}`, 'interval_too_short', { givenAt: 'too soon after the last dose' })
      }
    }
    const a = await Administration.create({
      prescriptionId: p.id, referralId, doseMg: input.doseMg, givenAt, batchNumber: input.batchNumber,
      reaction: input.reaction as Reaction, reactionNotes: input.reactionNotes ?? null, givenBy: viewer.userId,
    }, { transaction: t })
    const given = ((await Administration.sum('doseMg', { where: { prescriptionId: p.id }, transaction: t })) as number | null) ?? 0
    if (given >= p.totalMg) await p.update({ status: 'completed' }, { transaction: t })

    let version = r.version
    // A dose moves the episode to treating only where the pathway table itself offers this role
    // that move (today: a doctor, from clinic or recheck). Otherwise the dose is recorded, since it
    // was given, and the stage stays for someone allowed to move it.
    const moves = findMove(r.stage, 'treating')?.roles.includes(viewer.role) ?? false
    if (moves) {
      version = await recordMove(t, viewer, r, 'treating', `Iron given: ${input.doseMg} mg ${product.name} (batch ${input.batchNumber})`)
    }
    const recheckDueDate = addDays(givenAt.toISOString().slice(0, 10), settings.recheckDaysAfterLastDose)
    await Referral.update({ treatmentGivenAt: givenAt, recheckDueDate }, { where: { id: referralId }, transaction: t })
    const view = toAdministrationView(a)
    await recordAudit(t, viewer, { action: 'create', entity: 'administration', entityId: a.id, patientId: r.patientId, after: { ...view, recheckDueDate } })
    return { administration: view, recheckDueDate, stage: moves ? 'treating' : r.stage, version }
  })
}

export async function listAdministrations(viewer: Viewer, referralId: number) {
  const r = await loadReferral(viewer, referralId)
  await recordAudit(null, viewer, { action: 'view', entity: 'administrations', entityId: referralId, patientId: r.patientId })
  const rows = await Administration.findAll({ where: { referralId }, include: [{ model: User, as: 'giver', attributes: ['id', 'name'] }], order: [['givenAt', 'DESC']] })
  return rows.map(toAdministrationView)
}
