import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { ColumnMapping } from '../../shared/imports'

/** How one laboratory's CSV export is read; one per source name. */
export class ImportMapping extends Model<InferAttributes<ImportMapping>, InferCreationAttributes<ImportMapping>> {
  declare id: CreationOptional<number>
  declare sourceName: string
  declare mapping: ColumnMapping
  declare updatedBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initImportMapping(sequelize: Sequelize): void {
  ImportMapping.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      sourceName: { type: DataTypes.STRING(80), allowNull: false, unique: true },
      mapping: { type: DataTypes.JSON, allowNull: false },
      updatedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'import_mappings' },
  )
}
