import { UniqueConstraintError, type Sequelize } from 'sequelize'
import { Procedure } from '../models/index'
import type { CreateProcedureInput, UpdateProcedureInput } from '../../shared/schemas/procedures'
import type { ProcedureView } from '../../shared/pathway/views'
import { recordAudit, changedFields, type Actor } from './audit'
import { Conflict, NotFound } from '../errors'
import { worklistChanged } from './worklistCounts'

export function toProcedureView(p: Procedure | ProcedureView): ProcedureView {
  return {
    code: p.code,
    name: p.name,
    specialty: p.specialty,
    expectedBloodLossMl: p.expectedBloodLossMl,
    transfusionRate: p.transfusionRate,
    usualBloodOrder: p.usualBloodOrder,
    usualUnits: p.usualUnits,
    source: p.source,
    active: Boolean(p.active),
  }
}

/** The catalogue; retired operations stay on old referrals but are hidden from new ones. */
export async function listProcedures(includeInactive: boolean): Promise<ProcedureView[]> {
  const rows = await Procedure.findAll({
    where: includeInactive ? {} : { active: true },
    order: [
      ['specialty', 'ASC'],
      ['name', 'ASC'],
    ],
  })
  return rows.map(toProcedureView)
}

export async function findActiveProcedure(code: string): Promise<Procedure | null> {
  return Procedure.findOne({ where: { code, active: true } })
}

export async function createProcedure(sequelize: Sequelize, actor: Actor, input: CreateProcedureInput): Promise<ProcedureView> {
  try {
    return await sequelize.transaction(async (t) => {
      const p = await Procedure.create(
        {
          code: input.code,
          name: input.name,
          specialty: input.specialty,
          expectedBloodLossMl: input.expectedBloodLossMl ?? null,
          transfusionRate: input.transfusionRate ?? null,
          usualBloodOrder: input.usualBloodOrder,
          usualUnits: input.usualUnits,
          source: input.source,
          active: input.active,
        },
        { transaction: t },
      )
      const view = toProcedureView(p)
      await recordAudit(t, actor, { action: 'create', entity: 'procedure', entityId: p.code, after: view })
      return view
    })
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw new Conflict(`An operation with the code ${input.code} already exists`, 'duplicate_code', {
        code: 'is already in the catalogue',
      })
    }
    throw err
  }
}

export async function updateProcedure(
  sequelize: Sequelize,
  actor: Actor,
  code: string,
  input: UpdateProcedureInput,
): Promise<ProcedureView> {
  return sequelize.transaction(async (t) => {
    const p = await Procedure.findOne({ where: { code }, transaction: t, lock: t.LOCK.UPDATE })
    if (!p) throw new NotFound(`The operation ${code}`)
    const before = toProcedureView(p)
    const keys = [
      'name',
      'specialty',
      'expectedBloodLossMl',
      'transfusionRate',
      'usualBloodOrder',
      'usualUnits',
      'source',
      'active',
    ] as const
    for (const k of keys) if (input[k] !== undefined) p.set(k, input[k] as never)
    worklistChanged('procedure', t)
    await p.save({ transaction: t })
    const after = toProcedureView(p)
    await recordAudit(t, actor, { action: 'update', entity: 'procedure', entityId: code, ...changedFields(before, after) })
    return after
  })
}
