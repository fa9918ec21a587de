import { DataTypes, QueryTypes, type QueryInterface } from 'sequelize'

/**
 * HL7 v2 over MLLP: every message received is kept (raw text, control id, sender, outcome, the
 * ACK it was answered with, the records it changed), so a resent control id gets the same
 * answer and a message that needed attention can be processed again. Results gain what a
 * laboratory feed says beyond a number: a comparator ("<5"), a status (preliminary, final,
 * corrected) and a void (a correction replaces, a deletion voids; the row stays as history).
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('hl7_messages', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    received_at: { type: DataTypes.DATE, allowNull: false },
    control_id: { type: DataTypes.STRING(100), allowNull: false },
    sending_app: { type: DataTypes.STRING(100), allowNull: false },
    sending_facility: { type: DataTypes.STRING(100), allowNull: false },
    message_type: { type: DataTypes.STRING(20), allowNull: false },
    version: { type: DataTypes.STRING(10), allowNull: false },
    raw: { type: 'MEDIUMTEXT', allowNull: false },
    outcome: { type: DataTypes.STRING(16), allowNull: false },
    ack_code: { type: DataTypes.CHAR(2), allowNull: false },
    ack: { type: DataTypes.TEXT, allowNull: false },
    error_code: { type: DataTypes.STRING(40), allowNull: true },
    error_text: { type: DataTypes.STRING(1000), allowNull: true },
    changes: { type: DataTypes.JSON, allowNull: true },
    patient_mrn: { type: DataTypes.STRING(40), allowNull: true },
    needs_attention: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false },
    attempts: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    processed_at: { type: DataTypes.DATE, allowNull: false },
  })
  // One sender's control ids are unique (HL7 v2 MSH-10); the key makes a resend find its answer.
  await qi.addIndex('hl7_messages', ['sending_app', 'sending_facility', 'control_id'], { name: 'hl7_messages_control_id', unique: true })
  await qi.addIndex('hl7_messages', ['received_at'], { name: 'hl7_messages_received_at' })
  await qi.addIndex('hl7_messages', ['needs_attention', 'received_at'], { name: 'hl7_messages_attention' })

  await qi.addColumn('results', 'status', { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'final' })
  await qi.addColumn('results', 'comparator', { type: DataTypes.STRING(2), allowNull: true })
  await qi.addColumn('results', 'voided_at', { type: DataTypes.DATE, allowNull: true })
  await qi.addColumn('results', 'void_reason', { type: DataTypes.STRING(200), allowNull: true })
  await qi.addColumn('results', 'hl7_message_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
    references: { model: 'hl7_messages', key: 'id' },
    onDelete: 'SET NULL',
    onUpdate: 'CASCADE',
  })

  // SIU bookings are matched by the theatre system's placer appointment id (SCH-1/SCH-2).
  await qi.addColumn('referrals', 'placer_appointment_id', { type: DataTypes.STRING(80), allowNull: true })
  await qi.addColumn('referrals', 'surgery_date_history', { type: DataTypes.JSON, allowNull: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('referrals', 'surgery_date_history')
  await qi.removeColumn('referrals', 'placer_appointment_id')
  const fks = await qi.sequelize.query<{ name: string }>(
    `SELECT constraint_name AS name FROM information_schema.key_column_usage
     WHERE table_schema = DATABASE() AND table_name = 'results' AND column_name = 'hl7_message_id' AND referenced_table_name IS NOT NULL`,
    { type: QueryTypes.SELECT },
  )
  for (const fk of fks) await qi.sequelize.query(`ALTER TABLE results DROP FOREIGN KEY \`${fk.name}\``, { type: QueryTypes.RAW })
  for (const c of ['hl7_message_id', 'void_reason', 'voided_at', 'comparator', 'status']) await qi.removeColumn('results', c)
  await qi.dropTable('hl7_messages')
}
