import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Role } from '../../shared/roles'

export class User extends Model<InferAttributes<User>, InferCreationAttributes<User>> {
  declare id: CreationOptional<number>
  declare email: string
  declare name: string
  declare role: Role
  declare passwordHash: string
  declare active: CreationOptional<boolean>
  declare mustChangePassword: CreationOptional<boolean>
  /** When the temporary password stops working; null once the user has chosen their own. */
  declare temporaryPasswordExpiresAt: CreationOptional<Date | null>
  declare lastSignInAt: CreationOptional<Date | null>
  declare directorySubject: CreationOptional<string | null>
  declare totpSecret: CreationOptional<string | null>
  declare totpEnabledAt: CreationOptional<Date | null>
  declare totpLastStep: CreationOptional<number | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initUser(sequelize: Sequelize): void {
  User.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      email: { type: DataTypes.STRING(190), allowNull: false, unique: true },
      name: { type: DataTypes.STRING(120), allowNull: false },
      role: { type: DataTypes.STRING(16), allowNull: false },
      passwordHash: { type: DataTypes.STRING(255), allowNull: false },
      active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
      mustChangePassword: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      temporaryPasswordExpiresAt: { type: DataTypes.DATE, allowNull: true },
      lastSignInAt: { type: DataTypes.DATE, allowNull: true },
      directorySubject: { type: DataTypes.STRING(255), allowNull: true, unique: true },
      totpSecret: { type: DataTypes.STRING(64), allowNull: true },
      totpEnabledAt: { type: DataTypes.DATE, allowNull: true },
      totpLastStep: { type: DataTypes.BIGINT, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'users' },
  )
}
