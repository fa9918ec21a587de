import { DataTypes, Model, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** Unknown reply links per address, in the database so every server process counts them. */
export class AppointmentReplyFailure extends Model<
  InferAttributes<AppointmentReplyFailure>,
  InferCreationAttributes<AppointmentReplyFailure>
> {
  declare bucket: string
  declare failures: number
  declare windowStartedAt: Date
}

export function initAppointmentReplyFailure(sequelize: Sequelize): void {
  AppointmentReplyFailure.init(
    {
      bucket: { type: DataTypes.STRING(255), primaryKey: true },
      failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      windowStartedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'reply_failures', timestamps: false },
  )
}
