import { DataTypes, type QueryInterface } from 'sequelize'

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
}

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('users', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    email: { type: DataTypes.STRING(190), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    role: { type: DataTypes.STRING(16), allowNull: false },
    password_hash: { type: DataTypes.STRING(255), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    must_change_password: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    last_sign_in_at: { type: DataTypes.DATE, allowNull: true },
    ...timestamps,
  })
  await qi.addIndex('users', ['role'])

  await qi.createTable('sessions', {
    sid: { type: DataTypes.STRING(128), primaryKey: true },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    data: { type: DataTypes.TEXT, allowNull: false },
    expires_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('sessions', ['user_id'])
  await qi.addIndex('sessions', ['expires_at'])

  await qi.createTable('audit_entries', {
    id: { type: DataTypes.BIGINT.UNSIGNED, autoIncrement: true, primaryKey: true },
    at: { type: DataTypes.DATE(3), allowNull: false },
    user_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    action: { type: DataTypes.STRING(40), allowNull: false },
    entity: { type: DataTypes.STRING(40), allowNull: false },
    entity_id: { type: DataTypes.STRING(40), allowNull: true },
    patient_id: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    before: { type: DataTypes.JSON, allowNull: true },
    after: { type: DataTypes.JSON, allowNull: true },
    request_id: { type: DataTypes.STRING(40), allowNull: true },
    ip: { type: DataTypes.STRING(64), allowNull: true },
  })
  await qi.addIndex('audit_entries', ['at'])
  await qi.addIndex('audit_entries', ['user_id', 'at'])
  await qi.addIndex('audit_entries', ['entity', 'entity_id'])
  await qi.addIndex('audit_entries', ['patient_id', 'at'])

  await qi.createTable('login_failures', {
    bucket: { type: DataTypes.STRING(255), primaryKey: true },
    failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    window_started_at: { type: DataTypes.DATE, allowNull: false },
  })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('login_failures')
  await qi.dropTable('audit_entries')
  await qi.dropTable('sessions')
  await qi.dropTable('users')
}
