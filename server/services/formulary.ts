import { UniqueConstraintError, type Sequelize } from 'sequelize'
import { IronProductRow } from '../models/index'
import { validateIronProduct, type IronDosingTable, type IronProduct } from '../../shared/clinical'
import type { CreateIronProductInput, UpdateIronProductInput } from '../../shared/schemas/formulary'
import { recordAudit, changedFields, type Actor } from './audit'
import { clinical } from './viewer'
import { Conflict, NotFound } from '../errors'
import type { FormularyEntry } from '../../shared/formulary/views'

export const FORMULARY_CAUTION = "Check every cap against your local formulary and the product's prescribing information."

export type { FormularyEntry }

const orUndefined = <T>(v: T | null): T | undefined => (v === null ? undefined : v)

const storedTable = (row: IronProductRow): IronDosingTable | null =>
  typeof row.dosingTable === 'string' ? (JSON.parse(row.dosingTable) as IronDosingTable) : row.dosingTable

/**
 * The clinical library's view of a formulary row: nulls become "no such cap", and the product's
 * own table is passed on only when the admin has chosen that plans are dosed by it.
 */
export function toIronProduct(row: IronProductRow): IronProduct {
  return {
    code: row.code,
    name: row.name,
    route: row.route,
    maxSingleDoseMg: row.maxSingleDoseMg,
    maxSingleDoseMgPerKg: orUndefined(row.maxSingleDoseMgPerKg),
    minIntervalDays: row.minIntervalDays,
    maxWeeklyMg: orUndefined(row.maxWeeklyMg),
    maxTotalMg: orUndefined(row.maxTotalMg),
    roundToMg: orUndefined(row.roundToMg),
    oralDailyMg: orUndefined(row.oralDailyMg),
    oralAlternateDays: orUndefined(row.oralAlternateDays),
    licensedFromAgeYears: orUndefined(row.licensedFromAgeYears),
    paediatricMaxSingleDoseMgPerKg: orUndefined(row.paediatricMaxSingleDoseMgPerKg),
    paediatricMaxSingleDoseMg: orUndefined(row.paediatricMaxSingleDoseMg),
    dosingTable: row.dosedByTable ? orUndefined(storedTable(row)) : undefined,
    phosphateCheckOnRepeat: Boolean(row.phosphateCheckOnRepeat),
  }
}

export function toEntry(row: IronProductRow): FormularyEntry {
  return {
    ...toIronProduct(row),
    id: row.id,
    source: row.source,
    active: Boolean(row.active),
    caution: FORMULARY_CAUTION,
    dosingTable: storedTable(row),
    dosedByTable: Boolean(row.dosedByTable),
  }
}

export async function listFormulary(opts: { includeInactive?: boolean } = {}): Promise<FormularyEntry[]> {
  const rows = await IronProductRow.findAll({
    where: opts.includeInactive ? {} : { active: true },
    order: [
      ['route', 'ASC'],
      ['name', 'ASC'],
    ],
  })
  return rows.map(toEntry)
}

export async function findProduct(code: string): Promise<IronProductRow> {
  const row = await IronProductRow.findOne({ where: { code, active: true } })
  if (!row) throw new NotFound(`Formulary product "${code}"`)
  return row
}

export async function createProduct(sequelize: Sequelize, actor: Actor, input: CreateIronProductInput): Promise<FormularyEntry> {
  const candidate = {
    ...input,
    maxSingleDoseMgPerKg: input.maxSingleDoseMgPerKg ?? undefined,
    maxWeeklyMg: input.maxWeeklyMg ?? undefined,
    maxTotalMg: input.maxTotalMg ?? undefined,
    roundToMg: input.roundToMg ?? undefined,
    oralDailyMg: input.oralDailyMg ?? undefined,
    oralAlternateDays: input.oralAlternateDays ?? undefined,
    licensedFromAgeYears: input.licensedFromAgeYears ?? undefined,
    paediatricMaxSingleDoseMgPerKg: input.paediatricMaxSingleDoseMgPerKg ?? undefined,
    paediatricMaxSingleDoseMg: input.paediatricMaxSingleDoseMg ?? undefined,
  } as IronProduct
  clinical('product', () => validateIronProduct(candidate))
  try {
    return await sequelize.transaction(async (t) => {
      const row = await IronProductRow.create(
        {
          code: input.code,
          name: input.name,
          route: input.route as 'iv' | 'oral',
          maxSingleDoseMg: input.maxSingleDoseMg,
          maxSingleDoseMgPerKg: input.maxSingleDoseMgPerKg ?? null,
          minIntervalDays: input.minIntervalDays,
          maxWeeklyMg: input.maxWeeklyMg ?? null,
          maxTotalMg: input.maxTotalMg ?? null,
          roundToMg: input.roundToMg ?? null,
          oralDailyMg: input.oralDailyMg ?? null,
          oralAlternateDays: input.oralAlternateDays ?? null,
          source: input.source,
          licensedFromAgeYears: input.licensedFromAgeYears ?? null,
          paediatricMaxSingleDoseMgPerKg: input.paediatricMaxSingleDoseMgPerKg ?? null,
          paediatricMaxSingleDoseMg: input.paediatricMaxSingleDoseMg ?? null,
          phosphateCheckOnRepeat: input.phosphateCheckOnRepeat ?? false,
          active: input.active ?? true,
        },
        { transaction: t },
      )
      const entry = toEntry(row)
      await recordAudit(t, actor, { action: 'create', entity: 'iron-product', entityId: row.code, after: entry })
      return entry
    })
  } catch (err) {
    if (err instanceof UniqueConstraintError)
      throw new Conflict(`A product with code ${input.code} already exists`, 'duplicate_code', { code: 'is already used' })
    throw err
  }
}

export async function updateProduct(
  sequelize: Sequelize,
  actor: Actor,
  code: string,
  input: UpdateIronProductInput,
): Promise<FormularyEntry> {
  return sequelize.transaction(async (t) => {
    const row = await IronProductRow.findOne({ where: { code }, transaction: t, lock: t.LOCK.UPDATE })
    if (!row) throw new NotFound(`Formulary product "${code}"`)
    const before = toEntry(row)
    for (const [key, value] of Object.entries(input)) {
      if (value !== undefined) row.set(key as keyof UpdateIronProductInput, value as never)
    }
    // The library checks the edited caps as a whole (e.g. oral products need their dose).
    clinical('product', () => validateIronProduct(toIronProduct(row)))
    await row.save({ transaction: t })
    const after = toEntry(row)
    await recordAudit(t, actor, { action: 'update', entity: 'iron-product', entityId: code, ...changedFields(before, after) })
    return after
  })
}
