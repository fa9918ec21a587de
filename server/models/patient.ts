import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Sex } from '../../shared/clinical'

/** A person on the service's books. Patients never hold an account. */
export class Patient extends Model<InferAttributes<Patient>, InferCreationAttributes<Patient>> {
  declare id: CreationOptional<number>
  declare mrn: string
  declare givenName: string
  declare familyName: string
  declare dateOfBirth: string
  declare sex: Sex
  declare email: string | null
  declare phone: string | null
  declare gpPractice: string | null
  declare notes: string | null
  declare version: CreationOptional<number>
  declare createdBy: number | null
  declare createdAt: CreationOptional<Date>
  declare updatedAt: CreationOptional<Date>
}

export function initPatient(sequelize: Sequelize): void {
  Patient.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      mrn: { type: DataTypes.STRING(20), allowNull: false, unique: true },
      givenName: { type: DataTypes.STRING(80), allowNull: false },
      familyName: { type: DataTypes.STRING(80), allowNull: false },
      dateOfBirth: { type: DataTypes.DATEONLY, allowNull: false },
      sex: { type: DataTypes.STRING(8), allowNull: false },
      email: { type: DataTypes.STRING(190), allowNull: true },
      phone: { type: DataTypes.STRING(30), allowNull: true },
      gpPractice: { type: DataTypes.STRING(200), allowNull: true },
      notes: { type: DataTypes.TEXT, allowNull: true },
      version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
      createdBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      createdAt: DataTypes.DATE,
      updatedAt: DataTypes.DATE,
    },
    { sequelize, tableName: 'patients' },
  )
}
