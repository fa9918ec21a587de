import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** One-use codes that stand in for the authenticator; only their SHA-256 is kept. */
export class RecoveryCode extends Model<InferAttributes<RecoveryCode>, InferCreationAttributes<RecoveryCode>> {
  declare id: CreationOptional<number>
  declare userId: number
  declare codeSha256: string
  declare usedAt: CreationOptional<Date | null>
  declare createdAt: CreationOptional<Date>
}

export function initRecoveryCode(sequelize: Sequelize): void {
  RecoveryCode.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      codeSha256: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      usedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'recovery_codes', updatedAt: false },
  )
}
