import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * The laboratory's own reference range (HL7 v2 OBX-7) and abnormal flags (OBX-8), kept on the
 * result as sent: the clinician sees the range the laboratory used for that sample, which may
 * differ from Ferrolane's thresholds. Empty for typed-in and derived values.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('results', 'reference_range', { type: DataTypes.STRING(60), allowNull: true })
  await qi.addColumn('results', 'abnormal_flags', { type: DataTypes.STRING(20), allowNull: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('results', 'abnormal_flags')
  await qi.removeColumn('results', 'reference_range')
}
