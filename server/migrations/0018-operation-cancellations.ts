import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * A planned operation can be cancelled, not only moved: the surgery-date history gains a kind
 * ('moved' or 'cancelled'), and a cancellation has no new date. Cancellations for anaemia are a
 * quality measure, so they live beside the postponements with the same who, when and why.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('surgery_date_changes', 'kind', { type: DataTypes.STRING(12), allowNull: false, defaultValue: 'moved' })
  await qi.changeColumn('surgery_date_changes', 'to_date', { type: DataTypes.DATEONLY, allowNull: true })
  // The quality report finds cancellations by the planned date that was cancelled.
  await qi.addIndex('surgery_date_changes', ['kind', 'from_date'], { name: 'surgery_date_changes_kind_from' })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeIndex('surgery_date_changes', 'surgery_date_changes_kind_from')
  await qi.sequelize.query("DELETE FROM surgery_date_changes WHERE kind = 'cancelled'")
  await qi.changeColumn('surgery_date_changes', 'to_date', { type: DataTypes.DATEONLY, allowNull: false })
  await qi.removeColumn('surgery_date_changes', 'kind')
}
