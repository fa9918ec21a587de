import type { Sequelize } from 'sequelize'
import { Patient, Referral, StageTransition, SurgeryDateChange } from '../models/index'
import type { CreateReferralInput, UpdateReferralInput } from '../../shared/schemas/referrals'
import { DEFAULT_ANAEMIA_CRITERIA, isReadOnly, type Priority } from '../../shared/pathway'
import { recordAudit, changedFields } from './audit'
import { findActiveProcedure } from './procedures'
import { isActiveSurgeon } from './staff'
import { staleVersion, type Viewer } from './viewer'
import { referralDetail } from './referralDetail'
import { Invalid, NotFound, RuleRefused } from '../errors'
import { worklistChanged } from './worklistCounts'
import { unitOfWork } from '../unitOfWork'
import type { ReferralDetail } from '../../shared/pathway/views'
import { refreshEpisodeFacts } from './reports/episodeFacts'

async function procedureIdFor(code: string): Promise<number> {
  const p = await findActiveProcedure(code)
  if (!p)
    throw new Invalid(`procedureCode ${code} is not an operation in the catalogue`, {
      procedureCode: 'must be an active operation from the catalogue',
    })
  return p.id
}

async function requireSurgeon(id: number): Promise<void> {
  if (!(await isActiveSurgeon(id))) {
    throw new Invalid('surgeonId must be an active surgeon', { surgeonId: 'must be an active surgeon' })
  }
}

/** What the audit trail keeps of a referral's own (editable) fields. */
function auditable(r: Referral) {
  return {
    patientId: r.patientId,
    procedureId: r.procedureId,
    surgeonId: r.surgeonId,
    plannedSurgeryDate: r.plannedSurgeryDate,
    priority: r.priority,
    referringSource: r.referringSource,
    listingDate: r.listingDate ?? null,
    stage: r.stage,
    version: r.version,
    redCellAntibodies: r.redCellAntibodies ?? null,
    declinesTransfusion: Boolean(r.declinesTransfusion),
  }
}

export async function createReferral(sequelize: Sequelize, viewer: Viewer, input: CreateReferralInput): Promise<ReferralDetail> {
  const patient = await Patient.findByPk(input.patientId)
  if (!patient) throw new Invalid('patientId does not match a registered patient', { patientId: 'must be a registered patient' })
  const procedureId = await procedureIdFor(input.procedureCode)
  await requireSurgeon(input.surgeonId)
  const id = await unitOfWork(sequelize, { idempotent: true }, async (t) => {
    worklistChanged('referral', t)
    const r = await Referral.create(
      {
        patientId: patient.id,
        procedureId,
        surgeonId: input.surgeonId,
        plannedSurgeryDate: input.plannedSurgeryDate,
        priority: input.priority as Priority,
        referringSource: input.referringSource ?? null,
        listingDate: input.listingDate ?? null,
        stage: 'referred',
        anaemiaCriteria: DEFAULT_ANAEMIA_CRITERIA,
        anaemic: null,
        anaemiaSeverity: null,
        ironStatus: null,
        proposedStage: null,
        latestHbGL: null,
        latestHbAt: null,
        createdBy: viewer.userId,
      },
      { transaction: t },
    )
    // The timeline starts with the referral itself.
    await StageTransition.create(
      { referralId: r.id, fromStage: null, toStage: 'referred', reason: null, userId: viewer.userId },
      { transaction: t },
    )
    await recordAudit(t, viewer, { action: 'create', entity: 'referral', entityId: r.id, patientId: patient.id, after: auditable(r) })
    return r.id
  })
  return referralDetail(viewer, id)
}

export async function updateReferral(
  sequelize: Sequelize,
  viewer: Viewer,
  id: number,
  input: UpdateReferralInput,
): Promise<ReferralDetail> {
  const procedureId = input.procedureCode ? await procedureIdFor(input.procedureCode) : undefined
  if (input.surgeonId !== undefined) await requireSurgeon(input.surgeonId)
  await unitOfWork(sequelize, { idempotent: true }, async (t) => {
    const r = await Referral.findByPk(id, { transaction: t, lock: t.LOCK.UPDATE })
    if (!r) throw new NotFound('Referral')
    if (r.version !== input.version) throw staleVersion('This referral')
    if (isReadOnly(r.stage)) throw new RuleRefused('This episode is closed and read-only', 'closed_read_only')
    const before = auditable(r)
    const moves = input.plannedSurgeryDate !== undefined && input.plannedSurgeryDate !== r.plannedSurgeryDate
    // Every move of the surgery date is kept with its reason: postponements for anaemia are a quality measure.
    if (moves && !input.dateChangeReason) {
      throw new Invalid('Say why the surgery date is changing', { dateChangeReason: 'is required when the planned surgery date changes' })
    }
    if (input.listingDate != null && input.listingDate > (input.plannedSurgeryDate ?? r.plannedSurgeryDate)) {
      throw new Invalid('The listing date is after the planned surgery date', {
        listingDate: 'must be on or before the planned surgery date',
      })
    }
    const changes = {
      ...(procedureId !== undefined ? { procedureId } : {}),
      ...(input.surgeonId !== undefined ? { surgeonId: input.surgeonId } : {}),
      ...(input.plannedSurgeryDate !== undefined ? { plannedSurgeryDate: input.plannedSurgeryDate } : {}),
      ...(input.priority !== undefined ? { priority: input.priority as Priority } : {}),
      ...(input.referringSource !== undefined ? { referringSource: input.referringSource } : {}),
      ...(input.redCellAntibodies !== undefined ? { redCellAntibodies: input.redCellAntibodies } : {}),
      ...(input.declinesTransfusion !== undefined ? { declinesTransfusion: input.declinesTransfusion } : {}),
      ...(input.listingDate !== undefined ? { listingDate: input.listingDate } : {}),
    }
    worklistChanged('referral', t)
    const [count] = await Referral.update(
      { ...changes, version: input.version + 1 },
      { where: { id, version: input.version }, transaction: t },
    )
    if (count !== 1) throw staleVersion('This referral')
    if (moves) {
      await SurgeryDateChange.create(
        {
          referralId: id,
          fromDate: r.plannedSurgeryDate,
          toDate: input.plannedSurgeryDate!,
          reason: input.dateChangeReason!,
          note: input.dateChangeNote ?? null,
          changedBy: viewer.userId,
          changedAt: new Date(),
        },
        { transaction: t },
      )
      await refreshEpisodeFacts(t, [id]) // postponements for anaemia
    }
    await r.reload({ transaction: t })
    await recordAudit(t, viewer, {
      action: 'update',
      entity: 'referral',
      entityId: id,
      patientId: r.patientId,
      ...changedFields(before, auditable(r)),
    })
  })
  return referralDetail(viewer, id)
}
