import { Sequelize } from 'sequelize'
import mariadb from 'mariadb'
import type { Config } from './config'

/**
 * Raw queries must name their type (QueryTypes.SELECT, ...): Sequelize 6's mariadb dialect
 * tries to delete the driver's non-configurable `meta` property from untyped results and throws.
 *
 * One Sequelize instance per app; tests create their own against the test database. */
export function createSequelize(config: Config): Sequelize {
  return new Sequelize(config.db.name, config.db.user, config.db.password, {
    host: config.db.host,
    port: config.db.port,
    dialect: 'mariadb',
    dialectModule: mariadb,
    logging: false,
    timezone: '+00:00',
    // A Unix socket skips the loopback TCP stack: about a tenth of a worklist request's CPU.
    dialectOptions: { connectTimeout: 3000, ...(config.db.socket ? { socketPath: config.db.socket } : {}) },
    pool: { max: config.db.poolMax, min: 0, acquire: 5000, idle: 10000, evict: 5000 },
    define: { underscored: true },
  })
}
