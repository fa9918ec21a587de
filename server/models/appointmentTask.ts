import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/** Work for the nurses that a patient's reply created (a request to rebook). */
export class AppointmentTask extends Model<InferAttributes<AppointmentTask>, InferCreationAttributes<AppointmentTask>> {
  declare id: CreationOptional<number>
  declare kind: 'rebook-request'
  declare appointmentId: number
  declare referralId: number
  declare patientId: number
  declare message: string | null
  declare status: CreationOptional<'open' | 'done'>
  declare doneAt: CreationOptional<Date | null>
  declare doneBy: CreationOptional<number | null>
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initAppointmentTask(sequelize: Sequelize): void {
  AppointmentTask.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      kind: { type: DataTypes.STRING(20), allowNull: false },
      appointmentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      message: { type: DataTypes.STRING(1000), allowNull: true },
      status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'open' },
      doneAt: { type: DataTypes.DATE, allowNull: true },
      doneBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'appointment_tasks' },
  )
}
