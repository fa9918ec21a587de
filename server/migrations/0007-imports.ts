import { DataTypes, QueryTypes, type QueryInterface } from 'sequelize'

const userRef = {
  type: DataTypes.INTEGER.UNSIGNED,
  allowNull: true,
  references: { model: 'users', key: 'id' },
  onDelete: 'SET NULL',
  onUpdate: 'CASCADE',
}
const count = () => ({ type: DataTypes.INTEGER.UNSIGNED, allowNull: false, defaultValue: 0 })

/**
 * Laboratory imports: each file (CSV or FHIR bundle) is one batch that its results point to,
 * so a batch can be reviewed and reversed; column mappings are saved per laboratory source.
 * The natural key on results makes a re-imported or overlapping file unable to duplicate a
 * result, whatever path wrote it.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.createTable('import_batches', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    kind: { type: DataTypes.STRING(8), allowNull: false },
    source_name: { type: DataTypes.STRING(80), allowNull: false },
    file_name: { type: DataTypes.STRING(255), allowNull: false },
    sha256: { type: DataTypes.CHAR(64), allowNull: false },
    created_by: userRef,
    created_at: { type: DataTypes.DATE, allowNull: false },
    rows_read: count(),
    accepted: count(),
    skipped: count(),
    derived: count(),
    referrals_affected: count(),
    skip_counts: { type: DataTypes.JSON, allowNull: true },
    reversed_at: { type: DataTypes.DATE, allowNull: true },
    reversed_by: userRef,
    reversal_reason: { type: DataTypes.STRING(1000), allowNull: true },
    results_removed: { type: DataTypes.INTEGER.UNSIGNED, allowNull: true },
  })
  await qi.addIndex('import_batches', ['created_at'], { name: 'import_batches_created_at' })
  await qi.addIndex('import_batches', ['sha256'], { name: 'import_batches_sha256' })

  await qi.createTable('import_mappings', {
    id: { type: DataTypes.INTEGER.UNSIGNED, autoIncrement: true, primaryKey: true },
    source_name: { type: DataTypes.STRING(80), allowNull: false, unique: true },
    mapping: { type: DataTypes.JSON, allowNull: false },
    updated_by: userRef,
    created_at: { type: DataTypes.DATE, allowNull: false },
    updated_at: { type: DataTypes.DATE, allowNull: false },
  })

  await qi.addColumn('results', 'import_batch_id', {
    type: DataTypes.INTEGER.UNSIGNED,
    allowNull: true,
    references: { model: 'import_batches', key: 'id' },
    onDelete: 'RESTRICT',
    onUpdate: 'CASCADE',
  })
  // An existing database may hold the same value typed twice for one sample; the key cannot be
  // added over them, and deleting clinical rows silently is not a migration's call.
  const [dup] = await qi.sequelize.query<{ n: number }>(
    `SELECT COUNT(*) AS n FROM (SELECT 1 FROM results GROUP BY referral_id, analyte, taken_at, value_canonical HAVING COUNT(*) > 1) d`,
    { type: QueryTypes.SELECT },
  )
  if (Number(dup?.n ?? 0) > 0) {
    throw new Error(
      `0007-imports: ${dup!.n} results are stored twice (same referral, analyte, time taken and value); remove the copies, then ` +
        `migrate again`,
    )
  }
  // The referral stands for the patient (one episode of one patient); one sample gives one value.
  await qi.addIndex('results', ['referral_id', 'analyte', 'taken_at', 'value_canonical'], { name: 'results_natural_key', unique: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('results', 'results_natural_key')
  const fks = await qi.sequelize.query<{ name: string }>(
    `SELECT constraint_name AS name FROM information_schema.key_column_usage
     WHERE table_schema = DATABASE() AND table_name = 'results' AND column_name = 'import_batch_id' AND referenced_table_name IS NOT NULL`,
    { type: QueryTypes.SELECT },
  )
  for (const fk of fks) await qi.sequelize.query(`ALTER TABLE results DROP FOREIGN KEY \`${fk.name}\``, { type: QueryTypes.RAW })
  await qi.removeColumn('results', 'import_batch_id')
  await qi.dropTable('import_mappings')
  await qi.dropTable('import_batches')
}
