import type { Sequelize } from 'sequelize'
import { IronProductRow } from '../models/index'
import { draftToTable, validateIronProduct, type DosingTableDraft } from '../../shared/clinical'
import type { DosingTableInput } from '../../shared/schemas/dosingTable'
import type { FormularyEntry } from '../../shared/formulary/views'
import { recordAudit, changedFields, type Actor } from './audit'
import { clinical } from './viewer'
import { NotFound } from '../errors'
import { toEntry, toIronProduct } from './formulary'

/**
 * Saves a product's own dosing table and whether plans use it. The route has already run the
 * shared schema (bands without gaps or overlaps, every cell a sane need); the clinical library
 * then checks the product as a whole, so a table on an oral product is refused too.
 */
export async function setDosingTable(sequelize: Sequelize, actor: Actor, code: string, input: DosingTableInput): Promise<FormularyEntry> {
  return sequelize.transaction(async (t) => {
    const row = await IronProductRow.findOne({ where: { code }, transaction: t, lock: t.LOCK.UPDATE })
    if (!row) throw new NotFound(`Formulary product "${code}"`)
    const before = toEntry(row)
    row.dosingTable = input.table ? draftToTable(input.table as DosingTableDraft) : null
    row.dosedByTable = input.dosedByTable && input.table !== null
    clinical('dosingTable', () => validateIronProduct(toIronProduct(row)))
    // JSON columns are compared by reference: mark it so a changed table is always written.
    row.changed('dosingTable', true)
    await row.save({ transaction: t })
    const after = toEntry(row)
    await recordAudit(t, actor, { action: 'update', entity: 'iron-product', entityId: code, ...changedFields(before, after) })
    return after
  })
}
