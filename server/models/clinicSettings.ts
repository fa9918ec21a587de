import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { ClinicSettings } from '../../shared/clinic/settings'

/** One row (id 1) holding the clinic's thresholds; unset keys fall back to the stated defaults. */
export class ClinicSettingsRow extends Model<InferAttributes<ClinicSettingsRow>, InferCreationAttributes<ClinicSettingsRow>> {
  declare id: number
  declare values: Partial<ClinicSettings>
  declare updatedBy: number | null
  declare updatedAt: Date
}

export function initClinicSettings(sequelize: Sequelize): void {
  ClinicSettingsRow.init(
    {
      id: { type: DataTypes.TINYINT.UNSIGNED, primaryKey: true },
      values: { type: DataTypes.JSON, allowNull: false },
      updatedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      updatedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'clinic_settings', createdAt: false },
  )
}
