import type { IronDosingTable } from '../../shared/clinical'
import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** A formulary entry; its caps are data so the hospital can match its own protocols. */
export class IronProductRow extends Model<InferAttributes<IronProductRow>, InferCreationAttributes<IronProductRow>> {
  declare id: CreationOptional<number>
  declare code: string
  declare name: string
  declare route: 'iv' | 'oral'
  declare maxSingleDoseMg: number
  declare maxSingleDoseMgPerKg: number | null
  declare minIntervalDays: number
  declare maxWeeklyMg: number | null
  declare maxTotalMg: number | null
  declare roundToMg: number | null
  declare oralDailyMg: number | null
  declare oralAlternateDays: boolean | null
  declare licensedFromAgeYears: CreationOptional<number | null>
  declare paediatricMaxSingleDoseMgPerKg: CreationOptional<number | null>
  declare paediatricMaxSingleDoseMg: CreationOptional<number | null>
  declare dosingTable: CreationOptional<IronDosingTable | null>
  declare phosphateCheckOnRepeat: CreationOptional<boolean>
  /** Plans use dosingTable only when this is set (migration 0017). */
  declare dosedByTable: CreationOptional<boolean>
  declare source: string
  declare active: CreationOptional<boolean>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initIronProduct(sequelize: Sequelize): void {
  IronProductRow.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      code: { type: DataTypes.STRING(30), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      route: { type: DataTypes.STRING(4), allowNull: false },
      maxSingleDoseMg: { type: DataTypes.DOUBLE, allowNull: false },
      maxSingleDoseMgPerKg: { type: DataTypes.DOUBLE, allowNull: true },
      minIntervalDays: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      maxWeeklyMg: { type: DataTypes.DOUBLE, allowNull: true },
      maxTotalMg: { type: DataTypes.DOUBLE, allowNull: true },
      roundToMg: { type: DataTypes.DOUBLE, allowNull: true },
      oralDailyMg: { type: DataTypes.DOUBLE, allowNull: true },
      oralAlternateDays: { type: DataTypes.BOOLEAN, allowNull: true },
      licensedFromAgeYears: { type: DataTypes.DOUBLE, allowNull: true },
      paediatricMaxSingleDoseMgPerKg: { type: DataTypes.DOUBLE, allowNull: true },
      paediatricMaxSingleDoseMg: { type: DataTypes.DOUBLE, allowNull: true },
      dosingTable: { type: DataTypes.JSON, allowNull: true },
      phosphateCheckOnRepeat: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      dosedByTable: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      source: { type: DataTypes.STRING(300), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'iron_products' },
  )
}
