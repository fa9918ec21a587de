import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** Failed sign-ins per account and per address, kept in the database so every server process sees them. */
export class LoginFailure extends Model<InferAttributes<LoginFailure>, InferCreationAttributes<LoginFailure>> {
  declare bucket: string
  declare failures: number
  declare windowStartedAt: Date
}

export function initLoginFailure(sequelize: Sequelize): void {
  LoginFailure.init(
    {
      bucket: { type: DataTypes.STRING(255), primaryKey: true },
      failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      windowStartedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'login_failures', timestamps: false },
  )
}
