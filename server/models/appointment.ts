import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { AppointmentKind, AppointmentStatus } from '../../shared/appointments'

/** One visit of a patient for an episode. Moves and cancellations keep the row and add events. */
export class Appointment extends Model<InferAttributes<Appointment>, InferCreationAttributes<Appointment>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare patientId: number
  declare kind: AppointmentKind
  declare startsAt: Date
  declare endsAt: Date
  declare durationMin: number
  declare location: string
  declare infusionSessionId: number | null
  declare status: CreationOptional<AppointmentStatus>
  declare sequence: CreationOptional<number>
  declare version: CreationOptional<number>
  /** When the reminder falls due; cleared once it is queued (or when there is no time for one). */
  declare remindAt: Date | null
  declare cancelReason: CreationOptional<string | null>
  declare confirmedAt: CreationOptional<Date | null>
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initAppointment(sequelize: Sequelize): void {
  Appointment.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      kind: { type: DataTypes.STRING(24), allowNull: false },
      startsAt: { type: DataTypes.DATE, allowNull: false },
      endsAt: { type: DataTypes.DATE, allowNull: false },
      durationMin: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
      location: { type: DataTypes.STRING(200), allowNull: false },
      infusionSessionId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'booked' },
      sequence: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
      version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
      remindAt: { type: DataTypes.DATE, allowNull: true },
      cancelReason: { type: DataTypes.STRING(500), allowNull: true },
      confirmedAt: { type: DataTypes.DATE, allowNull: true },
      createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'appointments' },
  )
}
