import { Umzug, SequelizeStorage } from 'umzug'
import type { Sequelize } from 'sequelize'
import { migrations } from './migrations/index'

/** Applies every pending migration; the start and test commands call this, never sync(). */
export async function migrate(sequelize: Sequelize): Promise<string[]> {
  const umzug = new Umzug({
    migrations: migrations.map((m) => ({ name: m.name, up: m.up, down: m.down })),
    context: sequelize.getQueryInterface(),
    storage: new SequelizeStorage({ sequelize, tableName: 'schema_migrations' }),
    logger: undefined,
  })
  const done = await umzug.up()
  return done.map((m) => m.name)
}
