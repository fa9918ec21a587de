import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { MessageKind, MessageStatus } from '../../shared/appointments'
import type { AppointmentSnapshot } from '../mail/snapshot'

/**
 * A patient e-mail waiting to go, written in the same transaction as the change it reports.
 * The worker claims rows (status 'sending' with a lease), sends them and records the outcome.
 */
export class OutboxMessage extends Model<InferAttributes<OutboxMessage>, InferCreationAttributes<OutboxMessage>> {
  declare id: CreationOptional<number>
  declare kind: MessageKind
  declare appointmentId: number | null
  declare referralId: number | null
  declare patientId: number | null
  declare toAddress: string
  declare subject: string
  declare payload: AppointmentSnapshot
  /** Makes a message once-only (reminders): a second insert with the same key is ignored. */
  declare dedupeKey: string | null
  declare status: CreationOptional<MessageStatus>
  declare attempts: CreationOptional<number>
  declare nextAttemptAt: Date
  declare claimedBy: CreationOptional<string | null>
  declare claimedUntil: CreationOptional<Date | null>
  declare lastError: CreationOptional<string | null>
  declare smtpMessageId: CreationOptional<string | null>
  declare sentAt: CreationOptional<Date | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initOutboxMessage(sequelize: Sequelize): void {
  OutboxMessage.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      kind: { type: DataTypes.STRING(16), allowNull: false },
      appointmentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      toAddress: { type: DataTypes.STRING(190), allowNull: false },
      subject: { type: DataTypes.STRING(250), allowNull: false },
      payload: { type: DataTypes.JSON, allowNull: false },
      dedupeKey: { type: DataTypes.STRING(120), allowNull: true, unique: true },
      status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
      attempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 0 },
      nextAttemptAt: { type: DataTypes.DATE(3), allowNull: false },
      claimedBy: { type: DataTypes.STRING(80), allowNull: true },
      claimedUntil: { type: DataTypes.DATE(3), allowNull: true },
      lastError: { type: DataTypes.STRING(1000), allowNull: true },
      smtpMessageId: { type: DataTypes.STRING(250), allowNull: true },
      sentAt: { type: DataTypes.DATE(3), allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'outbox_messages' },
  )
}
