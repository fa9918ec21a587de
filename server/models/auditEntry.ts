import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** Append-only: the application only ever inserts into this table. */
export class AuditEntry extends Model<InferAttributes<AuditEntry>, InferCreationAttributes<AuditEntry>> {
  declare id: CreationOptional<number>
  declare at: CreationOptional<Date>
  declare userId: number | null
  declare action: string
  declare entity: string
  declare entityId: string | null
  declare patientId: number | null
  declare before: object | null
  declare after: object | null
  declare requestId: string | null
  declare ip: string | null
}

export function initAuditEntry(sequelize: Sequelize): void {
  AuditEntry.init(
    {
      id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
      at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      action: { type: DataTypes.STRING(40), allowNull: false },
      entity: { type: DataTypes.STRING(40), allowNull: false },
      entityId: { type: DataTypes.STRING(40), allowNull: true },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      before: { type: DataTypes.JSON, allowNull: true },
      after: { type: DataTypes.JSON, allowNull: true },
      requestId: { type: DataTypes.STRING(40), allowNull: true },
      ip: { type: DataTypes.STRING(64), allowNull: true },
    },
    { sequelize, tableName: 'audit_entries', timestamps: false },
  )
}
