import type { Sequelize, Transaction } from 'sequelize'
import { ClinicSettingsRow } from '../models/index'
import { DEFAULT_CLINIC_SETTINGS, type ClinicSettings } from '../../shared/clinic/settings'
import type { ClinicSettingsInput } from '../../shared/schemas/clinicSettings'
import { recordAudit, type Actor } from './audit'

/** The clinic's thresholds: stored keys over the stated defaults. */
export async function getClinicSettings(t?: Transaction): Promise<ClinicSettings> {
  const row = await ClinicSettingsRow.findByPk(1, { transaction: t })
  return { ...DEFAULT_CLINIC_SETTINGS, ...(row?.values ?? {}) }
}

export async function updateClinicSettings(sequelize: Sequelize, actor: Actor, input: ClinicSettingsInput): Promise<ClinicSettings> {
  return sequelize.transaction(async (t) => {
    const before = await getClinicSettings(t)
    const row = await ClinicSettingsRow.findByPk(1, { transaction: t, lock: t.LOCK.UPDATE })
    const values = { ...(row?.values ?? {}), ...Object.fromEntries(Object.entries(input).filter(([, v]) => v !== undefined)) }
    await ClinicSettingsRow.upsert({ id: 1, values, updatedBy: actor.userId, updatedAt: new Date() }, { transaction: t })
    const after = { ...DEFAULT_CLINIC_SETTINGS, ...values }
    await recordAudit(t, actor, { action: 'update', entity: 'clinic-settings', entityId: 1, before, after })
    return after
  })
}
