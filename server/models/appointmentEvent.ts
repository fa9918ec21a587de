import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { AppointmentEventKind } from '../../shared/appointments/views'

/** The history of one appointment: each booking, move, cancellation and patient reply. */
export class AppointmentEvent extends Model<InferAttributes<AppointmentEvent>, InferCreationAttributes<AppointmentEvent>> {
  declare id: CreationOptional<number>
  declare appointmentId: number
  declare kind: AppointmentEventKind
  declare startsAt: Date | null
  declare durationMin: number | null
  declare location: string | null
  declare note: string | null
  declare userId: number | null
  declare at: CreationOptional<Date>
}

export function initAppointmentEvent(sequelize: Sequelize): void {
  AppointmentEvent.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      appointmentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      startsAt: { type: DataTypes.DATE, allowNull: true },
      durationMin: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
      location: { type: DataTypes.STRING(200), allowNull: true },
      note: { type: DataTypes.STRING(1000), allowNull: true },
      userId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      at: { type: DataTypes.DATE(3), allowNull: false, defaultValue: DataTypes.NOW },
    },
    { sequelize, tableName: 'appointment_events', timestamps: false },
  )
}
