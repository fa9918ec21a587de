import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { StoredAnalyte } from '../../shared/pathway'
import type { ResultStatus } from '../../shared/pathway/views'

/** How a result arrived: typed in, derived by the server, or imported (CSV or FHIR batch). */
export type ResultSource = 'manual' | 'derived' | 'lab-csv' | 'fhir' | 'hl7'

export type { ResultStatus }

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
  declare status: CreationOptional<ResultStatus>
  /** '<', '<=', '>' or '>=' when the laboratory reported a value beyond a limit ("<5"): kept as sent, not screened. */
  declare comparator: CreationOptional<string | null>
  /** Set when a correction replaced the value or the laboratory deleted it; the row stays as history. */
  declare voidedAt: CreationOptional<Date | null>
  declare voidReason: CreationOptional<string | null>
  declare hl7MessageId: CreationOptional<number | null>
  /** The laboratory's reference range (OBX-7) and abnormal flags (OBX-8), as sent; null when none came. */
  declare referenceRange: CreationOptional<string | null>
  declare abnormalFlags: CreationOptional<string | null>
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
      status: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'final' },
      comparator: { type: DataTypes.STRING(2), allowNull: true },
      voidedAt: { type: DataTypes.DATE, allowNull: true },
      voidReason: { type: DataTypes.STRING(200), allowNull: true },
      hl7MessageId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      referenceRange: { type: DataTypes.STRING(60), allowNull: true },
      abnormalFlags: { type: DataTypes.STRING(20), allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'results', updatedAt: false },
  )
}

/**
 * The rows screening and derivations may use: not voided, not preliminary, and a plain number
 * (a value beyond a limit says too little to classify by a threshold).
 */
export function screenableSql(alias = ''): string {
  const a = alias ? `${alias}.` : ''
  return `${a}voided_at IS NULL AND ${a}comparator IS NULL AND ${a}status <> 'preliminary'`
}
export const SCREENABLE_WHERE = { voidedAt: null, comparator: null, status: ['final', 'corrected'] }

/**
 * The rows that stand as the laboratory's final word, for every reader that counts or shows
 * results as final (reports, letters, exports, prescribing checks): not voided (OBX-11 X, or
 * replaced by a correction) and not preliminary (OBX-11 P). A value beyond a limit ("<5") still
 * counts here as reported; only the screening thresholds leave it out (SCREENABLE_WHERE).
 */
export function finalSql(alias = ''): string {
  const a = alias ? `${alias}.` : ''
  return `${a}voided_at IS NULL AND ${a}status <> 'preliminary'`
}
export const FINAL_WHERE = { voidedAt: null, status: ['final', 'corrected'] }
