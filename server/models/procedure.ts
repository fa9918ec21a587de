import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { BloodOrder } from '../../shared/pathway'

/** The operations catalogue (admin-edited): what each operation usually costs in blood. */
export class Procedure extends Model<InferAttributes<Procedure>, InferCreationAttributes<Procedure>> {
  declare id: CreationOptional<number>
  declare code: string
  declare name: string
  declare specialty: string
  declare expectedBloodLossMl: number | null
  declare transfusionRate: number | null
  declare usualBloodOrder: BloodOrder
  declare usualUnits: number
  declare source: string
  declare active: CreationOptional<boolean>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initProcedure(sequelize: Sequelize): void {
  Procedure.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      code: { type: DataTypes.STRING(20), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(160), allowNull: false },
      specialty: { type: DataTypes.STRING(80), allowNull: false },
      expectedBloodLossMl: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      transfusionRate: { type: DataTypes.DOUBLE, allowNull: true },
      usualBloodOrder: { type: DataTypes.STRING(20), allowNull: false },
      usualUnits: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      source: { type: DataTypes.STRING(200), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'procedures' },
  )
}
