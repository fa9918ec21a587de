import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Reaction } from '../../shared/clinic/views'

export type { Reaction }

/** A dose actually given: what, when, which batch, and any reaction. */
export class Administration extends Model<InferAttributes<Administration>, InferCreationAttributes<Administration>> {
  declare id: CreationOptional<number>
  declare prescriptionId: number
  declare referralId: number
  declare doseMg: number
  declare givenAt: Date
  declare batchNumber: string
  declare reaction: Reaction
  declare reactionNotes: string | null
  declare givenBy: number | null
  /** Why a dose over a cap or the prescribed total was given anyway. */
  declare overrideReason: CreationOptional<string | null>
  declare createdAt: CreationOptional<Date>
}

export function initAdministration(sequelize: Sequelize): void {
  Administration.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      prescriptionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      doseMg: { type: DataTypes.DOUBLE, allowNull: false },
      overrideReason: { type: DataTypes.STRING(500), allowNull: true },
      givenAt: { type: DataTypes.DATE, allowNull: false },
      batchNumber: { type: DataTypes.STRING(40), allowNull: false },
      reaction: { type: DataTypes.STRING(12), allowNull: false },
      reactionNotes: { type: DataTypes.TEXT, allowNull: true },
      givenBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'administrations', updatedAt: false },
  )
}
