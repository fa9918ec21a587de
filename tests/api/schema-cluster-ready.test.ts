import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { readdirSync, readFileSync, statSync } from 'node:fs'
import path from 'node:path'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'

/**
 * Galera replicates row changes by primary key: a table without one replicates badly (every
 * row change is a full scan on every other node) and DELETEs on it may not replicate at all.
 * Only InnoDB tables are replicated. Checked on the migrated test database.
 */
let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})

function sourceFiles(dir: string): string[] {
  return readdirSync(dir).flatMap((name) => {
    const full = path.join(dir, name)
    return statSync(full).isDirectory() ? sourceFiles(full) : /\.ts$/.test(name) ? [full] : []
  })
}

describe('the schema on a cluster', () => {
  it('when migrated, then every table has a primary key and uses InnoDB', async () => {
    const tables = await t.sequelize.query<{ name: string; engine: string; pk: number }>(
      `SELECT t.table_name AS name, t.engine AS engine,
              (SELECT COUNT(*) FROM information_schema.table_constraints c
               WHERE c.table_schema = t.table_schema AND c.table_name = t.table_name AND c.constraint_type = 'PRIMARY KEY') AS pk
       FROM information_schema.tables t WHERE t.table_schema = DATABASE() AND t.table_type = 'BASE TABLE'`,
      { type: QueryTypes.SELECT },
    )
    expect(tables.length).toBeGreaterThan(20)
    expect(tables.filter((x) => Number(x.pk) !== 1).map((x) => x.name)).toEqual([])
    expect(tables.filter((x) => x.engine !== 'InnoDB').map((x) => x.name)).toEqual([])
  })

  it('then the server code takes no table locks and no named locks, which Galera does not replicate', () => {
    const root = path.resolve(import.meta.dirname, '..', '..', 'server')
    const offenders = sourceFiles(root).filter((f) =>
      /LOCK\s+TABLES|GET_LOCK\s*\(|SKIP\s+LOCKED/i.test(readFileSync(f, 'utf8').replace(/\/\*[\s\S]*?\*\/|\/\/.*$/gm, '')),
    )
    expect(offenders).toEqual([])
  })
})
