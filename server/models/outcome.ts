import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Complication } from '../../shared/schemas/outcomes'

/**
 * The post-operative record of one episode, with its follow-up on the same row (one each per
 * episode), so the outcome reports join one table to referrals.
 */
export class Outcome extends Model<InferAttributes<Outcome>, InferCreationAttributes<Outcome>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare surgeryDate: string
  declare bloodLossMl: number
  declare unitsTransfusedIntraOp: number
  declare unitsTransfusedPostOp: number
  declare unitsCrossmatched: number
  declare lowestHbGL: number
  declare dischargeHbGL: number | null
  declare lengthOfStayDays: number
  declare complications: Complication[]
  declare recordedBy: number | null
  declare followUpRecheckHbGL: CreationOptional<number | null>
  declare followUpRecheckDate: CreationOptional<string | null>
  declare followUpIronAfterSurgery: CreationOptional<boolean | null>
  declare followUpNotes: CreationOptional<string | null>
  declare followUpBy: CreationOptional<number | null>
  declare followUpAt: CreationOptional<Date | null>
  // Blood-saving measures (null = not recorded).
  declare tranexamicAcidGiven: CreationOptional<boolean | null>
  declare tranexamicAcidDoseMg: CreationOptional<number | null>
  declare tranexamicAcidTiming: CreationOptional<string | null>
  declare cellSalvageUsed: CreationOptional<boolean | null>
  declare cellSalvageReturnedMl: CreationOptional<number | null>
  declare transfusionInformationGiven: CreationOptional<boolean | null>
  declare transfusionConsent: CreationOptional<boolean | null>
  declare postOperativeIronGiven: CreationOptional<boolean | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initOutcome(sequelize: Sequelize): void {
  Outcome.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, unique: true },
      surgeryDate: { type: DataTypes.DATEONLY, allowNull: false },
      bloodLossMl: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      unitsTransfusedIntraOp: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, field: 'units_transfused_intra_op' },
      unitsTransfusedPostOp: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, field: 'units_transfused_post_op' },
      unitsCrossmatched: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
      lowestHbGL: { type: DataTypes.DOUBLE, allowNull: false, field: 'lowest_hb_gl' },
      dischargeHbGL: { type: DataTypes.DOUBLE, allowNull: true, field: 'discharge_hb_gl' },
      lengthOfStayDays: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
      complications: { type: DataTypes.JSON, allowNull: false },
      recordedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      followUpRecheckHbGL: { type: DataTypes.DOUBLE, allowNull: true, field: 'follow_up_recheck_hb_gl' },
      followUpRecheckDate: { type: DataTypes.DATEONLY, allowNull: true },
      followUpIronAfterSurgery: { type: DataTypes.BOOLEAN, allowNull: true },
      followUpNotes: { type: DataTypes.TEXT, allowNull: true },
      followUpBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      followUpAt: { type: DataTypes.DATE, allowNull: true },
      tranexamicAcidGiven: { type: DataTypes.BOOLEAN, allowNull: true },
      tranexamicAcidDoseMg: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      tranexamicAcidTiming: { type: DataTypes.STRING(20), allowNull: true },
      cellSalvageUsed: { type: DataTypes.BOOLEAN, allowNull: true },
      cellSalvageReturnedMl: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      transfusionInformationGiven: { type: DataTypes.BOOLEAN, allowNull: true },
      transfusionConsent: { type: DataTypes.BOOLEAN, allowNull: true },
      postOperativeIronGiven: { type: DataTypes.BOOLEAN, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'outcomes' },
  )
}
