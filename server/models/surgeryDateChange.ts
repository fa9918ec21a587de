import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { DateChangeReason } from '../../shared/schemas/referrals'
import type { DateChangeKind } from '../../shared/schemas/cancellations'

/** Every move of the planned surgery date, and every cancellation of the operation, with who, when and why (never edited). */
export class SurgeryDateChange extends Model<InferAttributes<SurgeryDateChange>, InferCreationAttributes<SurgeryDateChange>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare fromDate: string
  declare kind: CreationOptional<DateChangeKind>
  /** The new date; null for a cancellation. */
  declare toDate: string | null
  declare reason: DateChangeReason
  declare note: string | null
  declare changedBy: number | null
  declare changedAt: Date
}

export function initSurgeryDateChange(sequelize: Sequelize): void {
  SurgeryDateChange.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      fromDate: { type: DataTypes.DATEONLY, allowNull: false },
      kind: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'moved' },
      toDate: { type: DataTypes.DATEONLY, allowNull: true },
      reason: { type: DataTypes.STRING(20), allowNull: false },
      note: { type: DataTypes.STRING(1000), allowNull: true },
      changedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      changedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'surgery_date_changes', timestamps: false },
  )
}
