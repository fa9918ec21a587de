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
  onDelete: 'CASCADE',
  onUpdate: 'CASCADE',
}

/**
 * The transfusion record (one row per transfusion event, any component), the blood-saving
 * measures on the operative record, the listing date and the history of surgery-date changes:
 * what the service's quality measures (NICE QS138, PBM performance measures) are counted from.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('transfusions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: referralRef,
    given_at: { type: DataTypes.DATE, allowNull: false },
    phase: { type: DataTypes.STRING(16), allowNull: false },
    component: { type: DataTypes.STRING(20), allowNull: false },
    units: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false },
    pre_transfusion_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    post_transfusion_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    reassessed_before_next: { type: DataTypes.BOOLEAN, allowNull: false },
    information_given: { type: DataTypes.BOOLEAN, allowNull: false },
    product_codes: { type: DataTypes.JSON, allowNull: false },
    reason: { type: DataTypes.TEXT, allowNull: true },
    // The threshold in force for this patient when the unit was recorded, kept with the row so
    // a later change of the operation or of cardiovascular disease does not rewrite history.
    threshold_gl: { type: DataTypes.DOUBLE, allowNull: false },
    threshold_basis: { type: DataTypes.STRING(200), allowNull: false },
    recorded_by: userRef,
    voided_at: { type: DataTypes.DATE, allowNull: true },
    voided_by: userRef,
    void_reason: { type: DataTypes.TEXT, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('transfusions', ['referral_id', 'given_at'], { name: 'transfusions_referral_given' })

  await qi.createTable('surgery_date_changes', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: referralRef,
    from_date: { type: DataTypes.DATEONLY, allowNull: false },
    to_date: { type: DataTypes.DATEONLY, allowNull: false },
    reason: { type: DataTypes.STRING(20), allowNull: false },
    note: { type: DataTypes.STRING(1000), allowNull: true },
    changed_by: userRef,
    changed_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('surgery_date_changes', ['referral_id', 'reason'], { name: 'surgery_date_changes_referral_reason' })

  await qi.addColumn('referrals', 'listing_date', { type: DataTypes.DATEONLY, allowNull: true })

  // Null = not recorded (older records); the quality measures count only a recorded "yes".
  await qi.addColumn('outcomes', 'tranexamic_acid_given', { type: DataTypes.BOOLEAN, allowNull: true })
  await qi.addColumn('outcomes', 'tranexamic_acid_dose_mg', { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true })
  await qi.addColumn('outcomes', 'tranexamic_acid_timing', { type: DataTypes.STRING(20), allowNull: true })
  await qi.addColumn('outcomes', 'cell_salvage_used', { type: DataTypes.BOOLEAN, allowNull: true })
  await qi.addColumn('outcomes', 'cell_salvage_returned_ml', { type: DataTypes.SMALLINT.UNSIGNED, allowNull: true })
  await qi.addColumn('outcomes', 'transfusion_information_given', { type: DataTypes.BOOLEAN, allowNull: true })
  await qi.addColumn('outcomes', 'transfusion_consent', { type: DataTypes.BOOLEAN, allowNull: true })
  await qi.addColumn('outcomes', 'post_operative_iron_given', { type: DataTypes.BOOLEAN, allowNull: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  for (const c of [
    'post_operative_iron_given',
    'transfusion_consent',
    'transfusion_information_given',
    'cell_salvage_returned_ml',
    'cell_salvage_used',
    'tranexamic_acid_timing',
    'tranexamic_acid_dose_mg',
    'tranexamic_acid_given',
  ]) {
    await qi.removeColumn('outcomes', c)
  }
  await qi.removeColumn('referrals', 'listing_date')
  await qi.dropTable('surgery_date_changes')
  await qi.dropTable('transfusions')
}
