import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Stage } from '../../shared/pathway'

/** Every move of an episode, append-only: the timeline is read from here. */
export class StageTransition extends Model<InferAttributes<StageTransition>, InferCreationAttributes<StageTransition>> {
  declare id: CreationOptional<number>
  declare referralId: number
  /** Null for the row that records the referral's creation. */
  declare fromStage: Stage | null
  declare toStage: Stage
  declare reason: string | null
  declare userId: number | null
  declare at: CreationOptional<Date>
}

export function initStageTransition(sequelize: Sequelize): void {
  StageTransition.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      fromStage: { type: DataTypes.STRING(12), allowNull: true },
      toStage: { type: DataTypes.STRING(12), allowNull: false },
      reason: { type: DataTypes.STRING(1000), allowNull: true },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
    },
    { sequelize, tableName: 'stage_transitions', timestamps: false },
  )
}
