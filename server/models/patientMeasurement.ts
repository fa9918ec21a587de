import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

/**
 * Height and weight history, append-only: a new figure is a new row, so doses and blood
 * volumes computed in the past can always be traced to the figure used at the time.
 */
export class PatientMeasurement extends Model<InferAttributes<PatientMeasurement>, InferCreationAttributes<PatientMeasurement>> {
  declare id: CreationOptional<number>
  declare patientId: number
  declare heightCm: number | null
  declare weightKg: number | null
  declare measuredAt: Date
  declare recordedBy: number | null
  declare createdAt: CreationOptional<Date>
}

export function initPatientMeasurement(sequelize: Sequelize): void {
  PatientMeasurement.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      patientId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      heightCm: { type: DataTypes.DOUBLE, allowNull: true },
      weightKg: { type: DataTypes.DOUBLE, allowNull: true },
      measuredAt: { type: DataTypes.DATE, allowNull: false },
      recordedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'patient_measurements', updatedAt: false },
  )
}
