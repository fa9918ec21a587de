/**
 * Applies pending migrations to the database the environment names, from the compiled server
 * (`node dist-server/server/migrateMain.js`, or `npm run db:migrate:compiled`): a production host
 * runs it from the same files it runs the server from, with no TypeScript tooling installed.
 */
import { loadConfig } from './config'
import { createSequelize } from './db'
import { migrate } from './migrate'
import { createLogger } from './observability/logger'

const config = loadConfig()
const log = createLogger(config.logLevel === 'silent' ? 'info' : config.logLevel)
const sequelize = createSequelize(config)
migrate(sequelize)
  .then((done) => log.info({ applied: done }, done.length ? `applied: ${done.join(', ')}` : 'nothing to apply'))
  .catch((err: unknown) => {
    log.fatal({ err }, 'migration failed; the database is left at the last migration that completed')
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
