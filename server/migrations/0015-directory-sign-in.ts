import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Directory (OpenID Connect) sign-in and a second factor for local accounts. The directory's
 * subject is kept once an account is linked, so a recycled e-mail address cannot take it over.
 * Recovery codes are stored as SHA-256 digests only (they are long random strings, not passwords).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('users', 'directory_subject', { type: DataTypes.STRING(255), allowNull: true, unique: true })
  await qi.addColumn('users', 'totp_secret', { type: DataTypes.STRING(64), allowNull: true })
  await qi.addColumn('users', 'totp_enabled_at', { type: DataTypes.DATE, allowNull: true })
  // The last 30-second step accepted, so one code cannot be used twice.
  await qi.addColumn('users', 'totp_last_step', { type: DataTypes.BIGINT, allowNull: true })
  await qi.createTable('recovery_codes', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    user_id: {
      type: DataTypes.INTEGER.UNSIGNED,
      allowNull: false,
      references: { model: 'users', key: 'id' },
      onDelete: 'CASCADE',
      onUpdate: 'CASCADE',
    },
    code_sha256: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    used_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('recovery_codes', ['user_id'], { name: 'recovery_codes_user' })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('recovery_codes')
  await qi.removeColumn('users', 'totp_last_step')
  await qi.removeColumn('users', 'totp_enabled_at')
  await qi.removeColumn('users', 'totp_secret')
  await qi.removeColumn('users', 'directory_subject')
}
