import { DataTypes, type QueryInterface } from 'sequelize'

const timestamps = {
  created_at: { type: DataTypes.DATE, allowNull: false },
  updated_at: { type: DataTypes.DATE, allowNull: false },
}
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

export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('patients', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    mrn: { type: DataTypes.STRING(20), allowNull: false, unique: true },
    given_name: { type: DataTypes.STRING(80), allowNull: false },
    family_name: { type: DataTypes.STRING(80), allowNull: false },
    date_of_birth: { type: DataTypes.DATEONLY, allowNull: false },
    sex: { type: DataTypes.STRING(8), allowNull: false },
    email: { type: DataTypes.STRING(190), allowNull: true },
    phone: { type: DataTypes.STRING(30), allowNull: true },
    gp_practice: { type: DataTypes.STRING(200), allowNull: true },
    notes: { type: DataTypes.TEXT, allowNull: true },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    created_by: userRef,
    ...timestamps,
  })
  // Worklist search and sort by name.
  await qi.addIndex('patients', ['family_name', 'given_name'])
  await qi.addIndex('patients', ['given_name'])

  await qi.createTable('patient_measurements', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    patient_id: fk('patients', 'CASCADE'),
    height_cm: { type: DataTypes.DOUBLE, allowNull: true },
    weight_kg: { type: DataTypes.DOUBLE, allowNull: true },
    measured_at: { type: DataTypes.DATE, allowNull: false },
    recorded_by: userRef,
    created_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('patient_measurements', ['patient_id', 'measured_at'])

  await qi.createTable('procedures', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    code: { type: DataTypes.STRING(20), allowNull: false, unique: true },
    name: { type: DataTypes.STRING(160), allowNull: false },
    specialty: { type: DataTypes.STRING(80), allowNull: false },
    expected_blood_loss_ml: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
    transfusion_rate: { type: DataTypes.DOUBLE, allowNull: true },
    usual_blood_order: { type: DataTypes.STRING(20), allowNull: false },
    usual_units: { type: DataTypes.TINYINT.UNSIGNED, allowNull: false, defaultValue: 0 },
    source: { type: DataTypes.STRING(200), allowNull: false },
    active: { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: true },
    ...timestamps,
  })

  await qi.createTable('referrals', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    patient_id: fk('patients'),
    procedure_id: fk('procedures'),
    surgeon_id: fk('users'),
    planned_surgery_date: { type: DataTypes.DATEONLY, allowNull: false },
    priority: { type: DataTypes.STRING(10), allowNull: false, defaultValue: 'routine' },
    referring_source: { type: DataTypes.STRING(200), allowNull: true },
    stage: { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'referred' },
    version: { type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 1 },
    anaemic: { type: DataTypes.BOOLEAN, allowNull: true },
    anaemia_severity: { type: DataTypes.STRING(10), allowNull: true },
    anaemia_criteria: { type: DataTypes.STRING(10), allowNull: false },
    iron_status: { type: DataTypes.STRING(20), allowNull: true },
    proposed_stage: { type: DataTypes.STRING(12), allowNull: true },
    latest_hb_gl: { type: DataTypes.DOUBLE, allowNull: true },
    latest_hb_at: { type: DataTypes.DATE, allowNull: true },
    recheck_due_date: { type: DataTypes.DATEONLY, allowNull: true },
    treatment_ordered_at: { type: DataTypes.DATE, allowNull: true },
    treatment_given_at: { type: DataTypes.DATE, allowNull: true },
    created_by: userRef,
    ...timestamps,
  })
  // The worklist's filters each lead with their own column and end in the default sort
  // (planned surgery date), so a filtered, sorted page is an index range scan.
  await qi.addIndex('referrals', ['planned_surgery_date'])
  await qi.addIndex('referrals', ['stage', 'planned_surgery_date'])
  await qi.addIndex('referrals', ['surgeon_id', 'stage', 'planned_surgery_date'])
  await qi.addIndex('referrals', ['procedure_id', 'planned_surgery_date'])
  await qi.addIndex('referrals', ['priority', 'planned_surgery_date'])
  await qi.addIndex('referrals', ['patient_id'])
  // Flag columns: anaemic + surgery window; no Hb yet; re-check due; treatment not given.
  await qi.addIndex('referrals', ['anaemic', 'planned_surgery_date'])
  await qi.addIndex('referrals', ['latest_hb_at'])
  await qi.addIndex('referrals', ['recheck_due_date'])
  await qi.addIndex('referrals', ['treatment_ordered_at', 'treatment_given_at'])
  await qi.addIndex('referrals', ['latest_hb_gl'])

  await qi.createTable('results', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    patient_id: fk('patients', 'CASCADE'),
    analyte: { type: DataTypes.STRING(16), allowNull: false },
    value_canonical: { type: DataTypes.DOUBLE, allowNull: false },
    unit_canonical: { type: DataTypes.STRING(20), allowNull: false },
    value_reported: { type: DataTypes.DOUBLE, allowNull: true },
    unit_reported: { type: DataTypes.STRING(20), allowNull: true },
    taken_at: { type: DataTypes.DATE, allowNull: false },
    entered_by: userRef,
    source: { type: DataTypes.STRING(16), allowNull: false, defaultValue: 'manual' },
    derived_from: { type: DataTypes.JSON, allowNull: true },
    created_at: { type: DataTypes.DATE, allowNull: false },
  })
  await qi.addIndex('results', ['referral_id', 'analyte', 'taken_at'])
  await qi.addIndex('results', ['patient_id', 'analyte', 'taken_at'])

  await qi.createTable('stage_transitions', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    referral_id: fk('referrals', 'CASCADE'),
    from_stage: { type: DataTypes.STRING(12), allowNull: true },
    to_stage: { type: DataTypes.STRING(12), allowNull: false },
    reason: { type: DataTypes.STRING(1000), allowNull: true },
    user_id: userRef,
    at: { type: DataTypes.DATE(3), allowNull: false },
  })
  await qi.addIndex('stage_transitions', ['referral_id', 'at'])
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.dropTable('stage_transitions')
  await qi.dropTable('results')
  await qi.dropTable('referrals')
  await qi.dropTable('procedures')
  await qi.dropTable('patient_measurements')
  await qi.dropTable('patients')
}
