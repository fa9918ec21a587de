import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { StoredAnalyte } from '../../shared/pathway'

/** How a result arrived: typed in, derived by the server, or imported (CSV or FHIR batch). */
export type ResultSource = 'manual' | 'derived' | 'lab-csv' | 'fhir'

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
  /** The import batch that brought it (derived values from an import carry it too). */
  declare importBatchId: CreationOptional<number | null>
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
      importBatchId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'results', updatedAt: false },
  )
}
