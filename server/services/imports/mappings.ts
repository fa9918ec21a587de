import { DEFAULT_MAPPING, type ColumnMapping, type MappingView } from '../../../shared/imports'
import { ImportMapping } from '../../models/index'
import { recordAudit, changedFields } from '../audit'
import { isoOrNull, type Viewer } from '../viewer'
import type { Sequelize } from 'sequelize'

export async function listMappings(): Promise<MappingView[]> {
  const rows = await ImportMapping.findAll({ order: [['sourceName', 'ASC']] })
  return rows.map((r) => ({ sourceName: r.sourceName, mapping: r.mapping, saved: true, updatedAt: isoOrNull(r.updatedAt) }))
}

/** The saved mapping of a source, or the default one (marked unsaved) for a new source. */
export async function mappingFor(sourceName: string): Promise<MappingView> {
  const row = await ImportMapping.findOne({ where: { sourceName } })
  if (!row) return { sourceName, mapping: DEFAULT_MAPPING, saved: false, updatedAt: null }
  return { sourceName, mapping: row.mapping, saved: true, updatedAt: isoOrNull(row.updatedAt) }
}

export async function saveMapping(sequelize: Sequelize, viewer: Viewer, sourceName: string, mapping: ColumnMapping): Promise<MappingView> {
  await sequelize.transaction(async (t) => {
    const row = await ImportMapping.findOne({ where: { sourceName }, transaction: t, lock: t.LOCK.UPDATE })
    if (row) {
      const diff = changedFields({ mapping: row.mapping }, { mapping })
      await ImportMapping.update({ mapping, updatedBy: viewer.userId }, { where: { id: row.id }, transaction: t })
      await recordAudit(t, viewer, { action: 'update', entity: 'import_mapping', entityId: row.id, ...diff })
    } else {
      const created = await ImportMapping.create({ sourceName, mapping, updatedBy: viewer.userId }, { transaction: t })
      await recordAudit(t, viewer, { action: 'create', entity: 'import_mapping', entityId: created.id, after: { sourceName, mapping } })
    }
  })
  return mappingFor(sourceName)
}
