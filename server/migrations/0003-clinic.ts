import { DataTypes, type QueryInterface } from 'sequelize'

const fk = (table: string, onDelete: 'RESTRICT' | 'CASCADE' = 'RESTRICT') => ({
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: false,
  references: { model: table, key: 'id' },
  onDelete,
  onUpdate: 'CASCADE',
})
const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
}
const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
}

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('iron_products', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    code: { type: DataTypes.STRING(30), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(120), allowNull: false },
    route: { type: DataTypes.STRING(4), allowNull: false },
    max_single_dose_mg: { type: DataTypes.DOUBLE, allowNull: false },
    max_single_dose_mg_per_kg: { type: DataTypes.DOUBLE, allowNull: true },
    min_interval_days: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false },
    max_weekly_mg: { type: DataTypes.DOUBLE, allowNull: true },
    max_total_mg: { type: DataTypes.DOUBLE, allowNull: true },
    round_to_mg: { type: DataTypes.DOUBLE, allowNull: true },
    oral_daily_mg: { type: DataTypes.DOUBLE, allowNull: true },
    oral_alternate_days: { type: DataTypes.BOOLEAN, allowNull: true },
    source: { type: DataTypes.STRING(300), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    ...timestamps,
  })

  await qi.createTable('clinic_settings', {
    id: { type: DataTypes.TINYINT.UNSIGNED, primaryKey: true },
    values: { type: DataTypes.JSON, allowNull: false },
    updated_by: userRef,
    updated_at: { type: DataTypes.DATE, allowNull: false },
  })

  await qi.createTable('clinic_reviews', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    diagnosis: { type: DataTypes.STRING(30), allowNull: false },
    notes: { type: DataTypes.TEXT, allowNull: true },
    plan: { type: DataTypes.TEXT, allowNull: false },
    reviewed_by: userRef,
    reviewed_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('clinic_reviews', ['referral_id', 'reviewed_at'])

  await qi.createTable('prescriptions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    product_code: { type: DataTypes.STRING(30), allowNull: false },
    route: { type: DataTypes.STRING(4), allowNull: false },
    weight_kg: { type: DataTypes.DOUBLE, allowNull: false },
    hb_gl: { type: DataTypes.DOUBLE, allowNull: false },
    target_hb_gl: { type: DataTypes.DOUBLE, allowNull: false },
    deficit_mg: { type: DataTypes.DOUBLE, allowNull: false },
    total_mg: { type: DataTypes.DOUBLE, allowNull: false },
    first_dose_date: { type: DataTypes.DATEONLY, allowNull: false },
    plan: { type: DataTypes.JSON, allowNull: false },
    cautions: { type: DataTypes.JSON, allowNull: true },
    override_reason: { type: DataTypes.TEXT, allowNull: true },
    status: { type: DataTypes.STRING(12), allowNull: false },
    prescribed_by: userRef,
    prescribed_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('prescriptions', ['referral_id', 'prescribed_at'])

  await qi.createTable('administrations', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    prescription_id: fk('prescriptions', 'CASCADE'),
    referral_id: fk('referrals', 'CASCADE'),
    dose_mg: { type: DataTypes.DOUBLE, allowNull: false },
    given_at: { type: DataTypes.DATE, allowNull: false },
    batch_number: { type: DataTypes.STRING(40), allowNull: false },
    reaction: { type: DataTypes.STRING(12), allowNull: false },
    reaction_notes: { type: DataTypes.TEXT, allowNull: true },
    given_by: userRef,
    created_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('administrations', ['referral_id', 'given_at'])

  await qi.createTable('readiness_reviews', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    surgeon_id: userRef,
    action: { type: DataTypes.STRING(24), allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: true },
    projection: { type: DataTypes.JSON, allowNull: false },
    at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('readiness_reviews', ['referral_id', 'at'])

  // Per-episode clinical facts the projection needs, and the surgeon's open request.
  await qi.addColumn('referrals', 'cardiovascular_disease', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
  await qi.addColumn('referrals', 'date_change_requested_at', { type: DataTypes.DATE, allowNull: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('referrals', 'date_change_requested_at')
  await qi.removeColumn('referrals', 'cardiovascular_disease')
  for (const t of ['readiness_reviews', 'administrations', 'prescriptions', 'clinic_reviews', 'clinic_settings', 'iron_products']) {
    await qi.dropTable(t)
  }
}
