import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Diagnosis } from '../../shared/clinic/diagnoses'

export class ClinicReview extends Model<InferAttributes<ClinicReview>, InferCreationAttributes<ClinicReview>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare diagnosis: Diagnosis
  declare notes: string | null
  declare plan: string
  declare reviewedBy: number | null
  declare reviewedAt: Date
}

export function initClinicReview(sequelize: Sequelize): void {
  ClinicReview.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      diagnosis: { type: DataTypes.STRING(30), allowNull: false },
      notes: { type: DataTypes.TEXT, allowNull: true },
      plan: { type: DataTypes.TEXT, allowNull: false },
      reviewedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      reviewedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'clinic_reviews', timestamps: false },
  )
}
