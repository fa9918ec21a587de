import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A block of time in the infusion unit with a number of chairs; iron infusions are booked into one. */
export class InfusionSession extends Model<InferAttributes<InfusionSession>, InferCreationAttributes<InfusionSession>> {
  declare id: CreationOptional<number>
  declare startsAt: Date
  declare endsAt: Date
  declare chairs: number
  declare location: string
  declare version: CreationOptional<number>
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initInfusionSession(sequelize: Sequelize): void {
  InfusionSession.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      startsAt: { type: DataTypes.DATE, allowNull: false },
      endsAt: { type: DataTypes.DATE, allowNull: false },
      chairs: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
      location: { type: DataTypes.STRING(200), allowNull: false },
      version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
      createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'infusion_sessions' },
  )
}
