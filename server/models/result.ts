import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { StoredAnalyte } from '../../shared/pathway'

/** How a result arrived. Lab imports (later) add their own sources. */
export type ResultSource = 'manual' | 'derived'

/** A laboratory value: stored canonical, with what was reported kept beside it. */
export class Result extends Model<InferAttributes<Result>, InferCreationAttributes<Result>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare patientId: number
  declare analyte: StoredAnalyte
  declare valueCanonical: number
  declare unitCanonical: string
  declare valueReported: number | null
  declare unitReported: string | null
  declare takenAt: Date
  declare enteredBy: number | null
  declare source: CreationOptional<string>
  /** For derived values (TSAT, eGFR): the ids of the results they were computed from. */
  declare derivedFrom: number[] | null
  declare createdAt: CreationOptional<Date>
}

export function initResult(sequelize: Sequelize): void {
  Result.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      analyte: { type: DataTypes.STRING(16), allowNull: false },
      valueCanonical: { type: DataTypes.DOUBLE, allowNull: false },
      unitCanonical: { type: DataTypes.STRING(20), allowNull: false },
      valueReported: { type: DataTypes.DOUBLE, allowNull: true },
      unitReported: { type: DataTypes.STRING(20), allowNull: true },
      takenAt: { type: DataTypes.DATE, allowNull: false },
      enteredBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      source: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'manual' },
      derivedFrom: { type: DataTypes.JSON, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'results', updatedAt: false },
  )
}
