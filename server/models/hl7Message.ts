import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { Hl7Change, Hl7Outcome } from '../../shared/hl7/views'

/** One HL7 v2 message received over MLLP, with the answer it got and what it changed. */
export class Hl7MessageRow extends Model<InferAttributes<Hl7MessageRow>, InferCreationAttributes<Hl7MessageRow>> {
  declare id: CreationOptional<number>
  declare receivedAt: Date
  declare controlId: string
  declare sendingApp: string
  declare sendingFacility: string
  declare messageType: string
  declare version: string
  declare raw: string
  declare outcome: Hl7Outcome
  declare ackCode: string
  declare ack: string
  declare errorCode: string | null
  declare errorText: string | null
  declare changes: Hl7Change[] | null
  declare patientMrn: string | null
  declare needsAttention: boolean
  declare attempts: CreationOptional<number>
  declare processedAt: Date
}

export function initHl7Message(sequelize: Sequelize): void {
  Hl7MessageRow.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      receivedAt: { type: DataTypes.DATE, allowNull: false },
      controlId: { type: DataTypes.STRING(100), allowNull: false },
      sendingApp: { type: DataTypes.STRING(100), allowNull: false },
      sendingFacility: { type: DataTypes.STRING(100), allowNull: false },
      messageType: { type: DataTypes.STRING(20), allowNull: false },
      version: { type: DataTypes.STRING(10), allowNull: false },
      raw: { type: DataTypes.TEXT('medium'), allowNull: false },
      outcome: { type: DataTypes.STRING(16), allowNull: false },
      ackCode: { type: DataTypes.CHAR(2), allowNull: false },
      ack: { type: DataTypes.TEXT, allowNull: false },
      errorCode: { type: DataTypes.STRING(40), allowNull: true },
      errorText: { type: DataTypes.STRING(1000), allowNull: true },
      changes: { type: DataTypes.JSON, allowNull: true },
      patientMrn: { type: DataTypes.STRING(40), allowNull: true },
      needsAttention: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
      attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
      processedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'hl7_messages', timestamps: false },
  )
}
