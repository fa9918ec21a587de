import { DataTypes, type QueryInterface } from 'sequelize'

const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
}
const referralRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: false,
  references: { model: 'referrals', key: 'id' },
  onDelete: 'RESTRICT',
  onUpdate: 'CASCADE',
}

/**
 * Episode documents (uploaded files and the clinic's own letters) and the letters written from
 * an episode. The file itself is on disk under UPLOAD_DIR with a random name; the row keeps what
 * the uploader called it, what its content is and a SHA-256 to prove the stored bytes unchanged.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('episode_documents', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: referralRef,
    kind: { type: DataTypes.STRING(24), allowNull: false },
    title: { type: DataTypes.STRING(200), allowNull: false },
    original_name: { type: DataTypes.STRING(255), allowNull: false },
    stored_name: { type: DataTypes.STRING(64), allowNull: false, unique: true },
    media_type: { type: DataTypes.STRING(64), allowNull: false },
    size_bytes: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    uploaded_by: userRef,
    uploaded_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('episode_documents', ['referral_id', 'uploaded_at'], { name: 'episode_documents_referral' })
  await qi.createTable('letters', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: referralRef,
    document_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      unique: true,
      references: { model: 'episode_documents', key: 'id' },
      onDelete: 'RESTRICT',
      onUpdate: 'CASCADE',
    },
    recipient: { type: DataTypes.STRING(16), allowNull: false },
    appointment_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: true,
      references: { model: 'appointments', key: 'id' },
      onDelete: 'SET NULL',
      onUpdate: 'CASCADE',
    },
    written_by: userRef,
    written_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('letters', ['referral_id', 'written_at'], { name: 'letters_referral' })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('letters')
  await qi.dropTable('episode_documents')
}
