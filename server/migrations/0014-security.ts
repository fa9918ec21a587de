import { DataTypes, type QueryInterface } from 'sequelize'

/**
 * Security hardening (issue 15):
 * - a temporary password from an administrator carries its own expiry;
 * - the audit trail is append-only in the database itself: triggers refuse every UPDATE and
 *   DELETE on audit_entries, whoever sends it (ASVS 7.3.3). TRUNCATE, which needs the DROP
 *   privilege and is not row-level, is left to whoever owns the schema (the test run empties
 *   tables that way); an operator who wants more runs the app under an account without DROP.
 */
export async function up({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.addColumn('users', 'temporary_password_expires_at', { type: DataTypes.DATE, allowNull: true })
  const refuse = (what: string) => `
    CREATE TRIGGER audit_entries_no_${what.toLowerCase()} BEFORE ${what} ON audit_entries FOR EACH ROW
      SIGNAL SQLSTATE '45000' SET MESSAGE_TEXT = 'audit_entries is append-only: ${what} refused'`
  await qi.sequelize.query(refuse('UPDATE'))
  await qi.sequelize.query(refuse('DELETE'))
}

export async function down({ context: qi }: { context: QueryInterface }): Promise<void> {
  await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_entries_no_delete')
  await qi.sequelize.query('DROP TRIGGER IF EXISTS audit_entries_no_update')
  await qi.removeColumn('users', 'temporary_password_expires_at')
}
