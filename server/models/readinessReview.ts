import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/**
 * A surgeon's answer to the readiness projection, stored with the projection exactly as they
 * saw it, so later data never rewrites what was acknowledged.
 */
export class ReadinessReview extends Model<InferAttributes<ReadinessReview>, InferCreationAttributes<ReadinessReview>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare surgeonId: number | null
  declare action: 'acknowledged' | 'date-change-requested'
  declare reason: string | null
  declare projection: object
  declare at: Date
}

export function initReadinessReview(sequelize: Sequelize): void {
  ReadinessReview.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      surgeonId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      action: { type: DataTypes.STRING(24), allowNull: false },
      reason: { type: DataTypes.TEXT, allowNull: true },
      projection: { type: DataTypes.JSON, allowNull: false },
      at: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'readiness_reviews', timestamps: false },
  )
}
