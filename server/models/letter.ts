import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'

export type LetterRecipient = 'family-doctor' | 'patient'

/** A letter written from an episode; its PDF is the episode document `documentId`. */
export class Letter extends Model<InferAttributes<Letter>, InferCreationAttributes<Letter>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare documentId: number
  declare recipient: LetterRecipient
  /** For a letter to the patient about one appointment. */
  declare appointmentId: number | null
  declare writtenBy: number | null
  declare writtenAt: Date
}

export function initLetter(sequelize: Sequelize): void {
  Letter.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      documentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      recipient: { type: DataTypes.STRING(16), allowNull: false },
      appointmentId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      writtenBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      writtenAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'letters', timestamps: false },
  )
}
