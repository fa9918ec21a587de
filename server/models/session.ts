import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** express-session rows; userId lets a deactivation end that user's sessions at once. */
export class SessionRow extends Model<InferAttributes<SessionRow>, InferCreationAttributes<SessionRow>> {
  declare sid: string
  declare userId: number | null
  declare data: string
  declare expiresAt: Date
}

export function initSessionRow(sequelize: Sequelize): void {
  SessionRow.init(
    {
      sid: { type: DataTypes.STRING(128), primaryKey: true },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      data: { type: DataTypes.TEXT, allowNull: false },
      expiresAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'sessions', timestamps: false },
  )
}
