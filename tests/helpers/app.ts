import { QueryTypes, type Sequelize } from 'sequelize'
import { loadConfig, type Config } from '../../server/config'
import { createSequelize } from '../../server/db'
import { createApp, type FerrolaneApp } from '../../server/app'
import { initModels } from '../../server/models/index'
import { forgetWorklistCounts } from '../../server/services/worklistCounts'

export interface TestApp extends FerrolaneApp {
  config: Config
  sequelize: Sequelize
  close(): Promise<void>
  /** Points the models back at this app's database after another app was built in the same file. */
  rebind(): void
}

/** Config from the environment `npm test` prepared (its own MariaDB), with per-test overrides. */
export function testConfig(overrides: Record<string, string> = {}): Config {
  return loadConfig({ ...process.env, NODE_ENV: 'test', STATIC_DIR: '', ...overrides })
}

export function makeTestApp(overrides: Record<string, string> = {}): TestApp {
  const config = testConfig(overrides)
  const sequelize = createSequelize(config)
  const built = createApp(config, sequelize)
  return { ...built, config, sequelize, close: () => sequelize.close(), rebind: () => initModels(sequelize) }
}

/** Empties every table but the migration record: each test file starts from nothing. */
export async function cleanDatabase(sequelize: Sequelize): Promise<void> {
  const tables = await sequelize.query<{ name: string }>(
    `SELECT table_name AS name FROM information_schema.tables
     WHERE table_schema = DATABASE() AND table_type = 'BASE TABLE' AND table_name <> 'schema_migrations'`,
    { type: QueryTypes.SELECT },
  )
  await clearAuditTrail(sequelize)
  // Written behind the services' back, so the cached worklist totals are forgotten by hand.
  forgetWorklistCounts()
  // One transaction pins one connection, so the foreign-key switch applies to every DELETE.
  await sequelize.transaction(async (transaction) => {
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 0', { type: QueryTypes.RAW, transaction })
    for (const t of tables.filter((x) => x.name !== 'audit_entries'))
      await sequelize.query(`DELETE FROM \`${t.name}\``, { type: QueryTypes.BULKDELETE, transaction })
    await sequelize.query('SET FOREIGN_KEY_CHECKS = 1', { type: QueryTypes.RAW, transaction })
  })
}

/** The audit trail refuses DELETE (migration 0014); a test run empties it the only way left, TRUNCATE. */
export async function clearAuditTrail(sequelize: Sequelize): Promise<void> {
  await sequelize.query('TRUNCATE TABLE audit_entries', { type: QueryTypes.RAW })
}
