import { DataTypes, Model, type CreationOptional, type InferAttributes, type InferCreationAttributes, type Sequelize } from 'sequelize'
import type { DocumentKind } from '../../shared/schemas/documents'

/** A file kept on an episode; the bytes are on disk under UPLOAD_DIR as `storedName`. */
export class EpisodeDocument extends Model<InferAttributes<EpisodeDocument>, InferCreationAttributes<EpisodeDocument>> {
  declare id: CreationOptional<number>
  declare referralId: number
  declare kind: DocumentKind
  declare title: string
  declare originalName: string
  declare storedName: string
  /** From the content (magic bytes), never from the name or the browser's claim. */
  declare mediaType: string
  declare sizeBytes: number
  declare sha256: string
  declare uploadedBy: number | null
  declare uploadedAt: Date
}

export function initEpisodeDocument(sequelize: Sequelize): void {
  EpisodeDocument.init(
    {
      id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
      referralId: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      kind: { type: DataTypes.STRING(24), allowNull: false },
      title: { type: DataTypes.STRING(200), allowNull: false },
      originalName: { type: DataTypes.STRING(255), allowNull: false },
      storedName: { type: DataTypes.STRING(64), allowNull: false },
      mediaType: { type: DataTypes.STRING(64), allowNull: false },
      sizeBytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
      sha256: { type: DataTypes.CHAR(64), allowNull: false },
      uploadedBy: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
      uploadedAt: { type: DataTypes.DATE, allowNull: false },
    },
    { sequelize, tableName: 'episode_documents', timestamps: false },
  )
}
