import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { IronDose } from '../../shared/clinical'
import type { CautionAnswers } from '../../shared/clinic/cautions'

/** An iron prescription with the figures it was computed from, kept as they were at the time. */
export class Prescription extends Model<InferAttributes<Prescription>, InferCreationAttributes<Prescription>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare productCode: string
  declare route: 'iv' | 'oral'
  declare weightKg: number
  declare hbGL: number
  declare targetHbGL: number
  declare deficitMg: number
  declare totalMg: number
  declare firstDoseDate: string
  declare plan: { doses: IronDose[]; warnings: string[]; oralSchedule?: string | null }
  /** Null for oral iron, which has no checklist. */
  declare cautions: CautionAnswers | null
  declare overrideReason: string | null
  declare status: 'active' | 'completed' | 'cancelled'
  declare prescribedBy: number | null
  declare prescribedAt: Date
}

export function initPrescription(sequelize: Sequelize): void {
  Prescription.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      productCode: { type: DataTypes.STRING(30), allowNull: false },
      route: { type: DataTypes.STRING(4), allowNull: false },
      weightKg: { type: DataTypes.DOUBLE, allowNull: false },
      hbGL: { type: DataTypes.DOUBLE, allowNull: false, field: 'hb_gl' },
      targetHbGL: { type: DataTypes.DOUBLE, allowNull: false, field: 'target_hb_gl' },
      deficitMg: { type: DataTypes.DOUBLE, allowNull: false },
      totalMg: { type: DataTypes.DOUBLE, allowNull: false },
      firstDoseDate: { type: DataTypes.DATEONLY, allowNull: false },
      plan: { type: DataTypes.JSON, allowNull: false },
      cautions: { type: DataTypes.JSON, allowNull: true },
      overrideReason: { type: DataTypes.TEXT, allowNull: true },
      status: { type: DataTypes.STRING(12), allowNull: false },
      prescribedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      prescribedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'prescriptions', timestamps: false },
  )
}
