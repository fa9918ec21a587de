import { DataTypes, type QueryInterface } from 'sequelize'

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
}
const fk = (table: string, onDelete: 'RESTRICT' | 'CASCADE' = 'RESTRICT', allowNull = false) => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull,
  references: { model: table, key: 'id' },
  onDelete: allowNull && onDelete === 'RESTRICT' ? 'SET NULL' : onDelete,
  onUpdate: 'CASCADE',
})
const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
}

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('infusion_sessions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    starts_at: { type: DataTypes.DATE, allowNull: false },
    ends_at: { type: DataTypes.DATE, allowNull: false },
    chairs: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    location: { type: DataTypes.STRING(200), allowNull: false },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    created_by: userRef,
    ...timestamps,
  })
  await qi.addIndex('infusion_sessions', ['starts_at'])

  await qi.createTable('appointments', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    patient_id: fk('patients', 'CASCADE'),
    kind: { type: DataTypes.STRING(24), allowNull: false },
    starts_at: { type: DataTypes.DATE, allowNull: false },
    ends_at: { type: DataTypes.DATE, allowNull: false },
    duration_min: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false },
    location: { type: DataTypes.STRING(200), allowNull: false },
    infusion_session_id: fk('infusion_sessions', 'RESTRICT', true),
    status: { type: DataTypes.STRING(20), allowNull: false, defaultValue: 'booked' },
    // iCalendar SEQUENCE: bumped on every move and on the cancellation (RFC 5545 §3.8.7.4).
    sequence: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    remind_at: { type: DataTypes.DATE, allowNull: true },
    cancel_reason: { type: DataTypes.STRING(500), allowNull: true },
    confirmed_at: { type: DataTypes.DATE, allowNull: true },
    created_by: userRef,
    ...timestamps,
  })
  // Double-booking check (a patient's visits around a time), chair counts, reminders due.
  await qi.addIndex('appointments', ['patient_id', 'starts_at'])
  await qi.addIndex('appointments', ['referral_id', 'starts_at'])
  await qi.addIndex('appointments', ['infusion_session_id', 'status'])
  await qi.addIndex('appointments', ['remind_at'])

  await qi.createTable('appointment_events', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    appointment_id: fk('appointments', 'CASCADE'),
    kind: { type: DataTypes.STRING(20), allowNull: false },
    starts_at: { type: DataTypes.DATE, allowNull: true },
    duration_min: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true },
    location: { type: DataTypes.STRING(200), allowNull: true },
    note: { type: DataTypes.STRING(1000), allowNull: true },
    // Null when the patient acted through their e-mailed link.
    user_id: userRef,
    at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await qi.addIndex('appointment_events', ['appointment_id', 'at'])

  await qi.createTable('outbox_messages', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.STRING(16), allowNull: false },
    appointment_id: fk('appointments', 'CASCADE', true),
    referral_id: fk('referrals', 'CASCADE', true),
    patient_id: fk('patients', 'CASCADE', true),
    to_address: { type: DataTypes.STRING(190), allowNull: false },
    subject: { type: DataTypes.STRING(250), allowNull: false },
    // What the e-mail says, frozen when the change was made; rendered at send time.
    payload: { type: DataTypes.JSON, allowNull: false },
    dedupe_key: { type: DataTypes.STRING(120), allowNull: true, unique: true },
    status: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'queued' },
    attempts: { type: DataTypes.SMALLINT.UNSIGNED, allowNull: false, defaultValue: 0 },
    next_attempt_at: { type: DataTypes.DATE(3), allowNull: false },
    claimed_by: { type: DataTypes.STRING(80), allowNull: true },
    claimed_until: { type: DataTypes.DATE(3), allowNull: true },
    last_error: { type: DataTypes.STRING(1000), allowNull: true },
    smtp_message_id: { type: DataTypes.STRING(250), allowNull: true },
    sent_at: { type: DataTypes.DATE(3), allowNull: true },
    ...timestamps,
  })
  // The worker's claim scans (status, due time); staff list by patient episode.
  await qi.addIndex('outbox_messages', ['status', 'next_attempt_at'])
  await qi.addIndex('outbox_messages', ['status', 'claimed_until'])
  await qi.addIndex('outbox_messages', ['referral_id', 'created_at'])
  await qi.addIndex('outbox_messages', ['appointment_id'])

  await qi.createTable('reply_tokens', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    appointment_id: fk('appointments', 'CASCADE'),
    // sha256 of the token in the link; the token itself is never stored.
    token_hash: { type: DataTypes.CHAR(64), allowNull: false, unique: true },
    outbox_message_id: fk('outbox_messages', 'CASCADE', true),
    confirmed_at: { type: DataTypes.DATE, allowNull: true },
    rebook_requested_at: { type: DataTypes.DATE, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  })

  await qi.createTable('reply_failures', {
    bucket: { type: DataTypes.STRING(255), primaryKey: true },
    failures: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    window_started_at: { type: DataTypes.DATE, allowNull: false },
  })

  await qi.createTable('appointment_tasks', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.STRING(20), allowNull: false },
    appointment_id: fk('appointments', 'CASCADE'),
    referral_id: fk('referrals', 'CASCADE'),
    patient_id: fk('patients', 'CASCADE'),
    message: { type: DataTypes.STRING(1000), allowNull: true },
    status: { type: DataTypes.STRING(8), allowNull: false, defaultValue: 'open' },
    done_at: { type: DataTypes.DATE, allowNull: true },
    done_by: userRef,
    ...timestamps,
  })
  await qi.addIndex('appointment_tasks', ['status', 'created_at'])
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('appointment_tasks')
  await qi.dropTable('reply_failures')
  await qi.dropTable('reply_tokens')
  await qi.dropTable('outbox_messages')
  await qi.dropTable('appointment_events')
  await qi.dropTable('appointments')
  await qi.dropTable('infusion_sessions')
}
