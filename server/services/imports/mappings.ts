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

/**
 * The local codes of a sending laboratory, for the HL7 listener: read once per sender, not once
 * per message. A save in this process forgets the entry at once; the time limit covers a
 * mapping changed from outside the server (a seed run).
 */
const CODES_TTL_MS = 30_000
const codesCache = new Map<string, { codes: Record<string, string>; until: number }>()

export async function codesFor(sourceName: string): Promise<Record<string, string>> {
  const hit = codesCache.get(sourceName)
  if (hit && hit.until > Date.now()) return hit.codes
  const codes = (await mappingFor(sourceName)).mapping.codes
  codesCache.set(sourceName, { codes, until: Date.now() + CODES_TTL_MS })
  return codes
}

export async function saveMapping(sequelize: Sequelize, viewer: Viewer, sourceName: string, mapping: ColumnMapping): Promise<MappingView> {
  codesCache.delete(sourceName)
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
  // Again after the commit: a message read between the first delete and the commit cached the old codes.
  codesCache.delete(sourceName)
  return mappingFor(sourceName)
}
