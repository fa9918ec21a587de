import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/**
 * The hash of a link sent to a patient. Each action (confirm, ask to rebook) can be used once;
 * the link stops working when the appointment is over or cancelled.
 */
export class AppointmentReplyToken extends Model<InferAttributes<AppointmentReplyToken>, InferCreationAttributes<AppointmentReplyToken>> {
  declare id: CreationOptional<number>
  declare appointmentId: number
  declare tokenHash: string
  declare outboxMessageId: number | null
  declare confirmedAt: CreationOptional<Date | null>
  declare rebookRequestedAt: CreationOptional<Date | null>
  declare createdAt: CreationOptional<Date>
}

export function initAppointmentReplyToken(sequelize: Sequelize): void {
  AppointmentReplyToken.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      appointmentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      tokenHash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
      outboxMessageId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      confirmedAt: { type: DataTypes.DATE, allowNull: true },
      rebookRequestedAt: { type: DataTypes.DATE, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'reply_tokens', updatedAt: false },
  )
}
