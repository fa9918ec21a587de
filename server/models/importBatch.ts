import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { ImportKind } from '../../shared/imports/views'

/** One imported file: who sent it, what came of its rows, and whether an admin reversed it. */
export class ImportBatch extends Model<InferAttributes<ImportBatch>, InferCreationAttributes<ImportBatch>> {
  declare id: CreationOptional<number>
  declare kind: ImportKind
  declare sourceName: string
  declare fileName: string
  declare sha256: string
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare rowsRead: CreationOptional<number>
  declare accepted: CreationOptional<number>
  declare skipped: CreationOptional<number>
  declare derived: CreationOptional<number>
  declare referralsAffected: CreationOptional<number>
  declare skipCounts: Record<string, number> | null
  declare reversedAt: Date | null
  declare reversedBy: number | null
  declare reversalReason: string | null
  declare resultsRemoved: number | null
}

export function initImportBatch(sequelize: Sequelize): void {
  // A fresh definition per attribute: Sequelize writes into each one it is given.
  const count = () => ({ type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 })
  ImportBatch.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      kind: { type: DataTypes.STRING(8), allowNull: false },
      sourceName: { type: DataTypes.STRING(80), allowNull: false },
      fileName: { type: DataTypes.STRING(255), allowNull: false },
      sha256: { type: DataTypes.CHAR(64), allowNull: false },
      createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      rowsRead: count(),
      accepted: count(),
      skipped: count(),
      derived: count(),
      referralsAffected: count(),
      skipCounts: { type: DataTypes.JSON, allowNull: true },
      reversedAt: { type: DataTypes.DATE, allowNull: true },
      reversedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      reversalReason: { type: DataTypes.STRING(1000), allowNull: true },
      resultsRemoved: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    },
    { sequelize, tableName: 'import_batches', updatedAt: false },
  )
}
