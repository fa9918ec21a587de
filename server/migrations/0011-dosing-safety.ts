import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Formulary fields for safer dosing: the youngest licensed age and the paediatric caps, the
 * product's own dosing table (weight band × Hb band, as its label prints it) and whether a
 * repeat course needs a phosphate result first. A dose given over a cap keeps its reason.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('iron_products', 'licensed_from_age_years', { type: DataTypes.DOUBLE, allowNull: true })
  await qi.addColumn('iron_products', 'paediatric_max_single_dose_mg_per_kg', { type: DataTypes.DOUBLE, allowNull: true })
  await qi.addColumn('iron_products', 'paediatric_max_single_dose_mg', { type: DataTypes.DOUBLE, allowNull: true })
  await qi.addColumn('iron_products', 'dosing_table', { type: DataTypes.JSON, allowNull: true })
  await qi.addColumn('iron_products', 'phosphate_check_on_repeat', { type: DataTypes.BOOLEAN, allowNull: false, defaultValue: false })
  await qi.addColumn('administrations', 'override_reason', { type: DataTypes.STRING(500), allowNull: true })
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.removeColumn('administrations', 'override_reason')
  for (const c of [
    'phosphate_check_on_repeat',
    'dosing_table',
    'paediatric_max_single_dose_mg',
    'paediatric_max_single_dose_mg_per_kg',
    'licensed_from_age_years',
  ]) {
    await qi.removeColumn('iron_products', c)
  }
}
