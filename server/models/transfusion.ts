import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Component, Phase } from '../../shared/transfusion/rules'

/** One transfusion event of one component; voided rows stay (with who and why) and count nowhere. */
export class Transfusion extends Model<InferAttributes<Transfusion>, InferCreationAttributes<Transfusion>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare givenAt: Date
  declare phase: Phase
  declare component: Component
  declare units: number
  declare preTransfusionHbGL: number | null
  declare postTransfusionHbGL: number | null
  declare reassessedBeforeNext: boolean
  declare informationGiven: boolean
  declare productCodes: string[]
  declare reason: string | null
  declare thresholdGL: number
  declare thresholdBasis: string
  declare recordedBy: number | null
  declare voidedAt: CreationOptional<Date | null>
  declare voidedBy: CreationOptional<number | null>
  declare voidReason: CreationOptional<string | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initTransfusion(sequelize: Sequelize): void {
  Transfusion.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      givenAt: { type: DataTypes.DATE, allowNull: false },
      phase: { type: DataTypes.STRING(16), allowNull: false },
      component: { type: DataTypes.STRING(20), allowNull: false },
      units: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
      preTransfusionHbGL: { type: DataTypes.DOUBLE, allowNull: true, field: 'pre_transfusion_hb_gl' },
      postTransfusionHbGL: { type: DataTypes.DOUBLE, allowNull: true, field: 'post_transfusion_hb_gl' },
      reassessedBeforeNext: { type: DataTypes.BOOLEAN, allowNull: false },
      informationGiven: { type: DataTypes.BOOLEAN, allowNull: false },
      productCodes: { type: DataTypes.JSON, allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: true },
      thresholdGL: { type: DataTypes.DOUBLE, allowNull: false, field: 'threshold_gl' },
      thresholdBasis: { type: DataTypes.STRING(200), allowNull: false },
      recordedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      voidedAt: { type: DataTypes.DATE, allowNull: true },
      voidedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      voidReason: { type: DataTypes.TEXT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'transfusions' },
  )
}
