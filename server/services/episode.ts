import type { Transaction } from 'sequelize'
import { Administration, Patient, Prescription, Procedure, Referral, Result } from '../models/index'
import { SCREENABLE_WHERE } from '../models/result'
import { currentBody } from './patients'
import { assertMaySeeReferral, type Viewer } from './viewer'
import { NotFound } from '../errors'

export type LoadedReferral = Referral & { patient: Patient; procedure: Procedure }

/** The referral with its patient and operation, checked against the caller's access. */
export async function loadReferral(viewer: Viewer, id: number, t?: Transaction, lock = false): Promise<LoadedReferral> {
  const r = (await Referral.findByPk(id, {
    include: [
      { model: Patient, as: 'patient' },
      { model: Procedure, as: 'procedure' },
    ],
    transaction: t,
    ...(lock && t ? { lock: t.LOCK.UPDATE, skipLocked: false } : {}),
  })) as LoadedReferral | null
  if (!r) throw new NotFound('Referral')
  assertMaySeeReferral(viewer, r.surgeonId)
  return r
}

/** The clinical facts a dose or a projection is computed from, as they are now. */
export async function clinicalFacts(r: LoadedReferral, t?: Transaction) {
  const [body, hbRows, doses, prescription] = await Promise.all([
    currentBody(r.patientId, t),
    Result.findAll({
      where: { referralId: r.id, analyte: 'hb', ...SCREENABLE_WHERE },
      order: [
        ['takenAt', 'ASC'],
        ['id', 'ASC'],
      ],
      transaction: t,
    }),
    Administration.findAll({ where: { referralId: r.id }, order: [['givenAt', 'ASC']], transaction: t }),
    Prescription.findOne({ where: { referralId: r.id, status: 'active' }, order: [['prescribedAt', 'DESC']], transaction: t }),
  ])
  return {
    body,
    hb: hbRows.map((h) => ({ takenAt: h.takenAt, hbGL: h.valueCanonical })),
    doses,
    prescription,
  }
}
