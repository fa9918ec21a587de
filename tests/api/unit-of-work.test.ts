import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import mariadb from 'mariadb'
import { QueryTypes } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import { unitOfWork } from '../../server/unitOfWork'
import { isDatabaseUnavailable } from '../../server/dbUnavailable'

/**
 * A real deadlock between two connections on the test MariaDB: the unit of work holds row 1
 * and asks for row 2; another connection, which has already changed many rows (so InnoDB picks
 * the unit, the lighter transaction, as the victim), holds row 2 and asks for row 1.
 */
let t: TestApp
const TABLE = 'zz_unit_of_work_probe'

beforeAll(async () => {
  t = makeTestApp()
  await t.sequelize.query(`CREATE TABLE IF NOT EXISTS ${TABLE} (id INT PRIMARY KEY, n INT NOT NULL) ENGINE=InnoDB`, {
    type: QueryTypes.RAW,
  })
})
afterAll(async () => {
  await t.sequelize.query(`DROP TABLE IF EXISTS ${TABLE}`, { type: QueryTypes.RAW })
  await t.close()
})

async function resetRows(): Promise<void> {
  await t.sequelize.query(`DELETE FROM ${TABLE}`, { type: QueryTypes.BULKDELETE })
  const values = Array.from({ length: 60 }, (_, i) => `(${i + 1}, 0)`).join(',')
  await t.sequelize.query(`INSERT INTO ${TABLE} (id, n) VALUES ${values}`, { type: QueryTypes.INSERT })
}

async function rowN(id: number): Promise<number> {
  const rows = await t.sequelize.query<{ n: number }>(`SELECT n FROM ${TABLE} WHERE id = ?`, {
    replacements: [id],
    type: QueryTypes.SELECT,
  })
  return Number(rows[0].n)
}

/** Runs the unit once with a deadlock provoked on its first try; returns how often it ran. */
async function withProvokedDeadlock(idempotent: boolean): Promise<{ tries: number; outcome: Promise<unknown> }> {
  const db = t.config.db
  const other = await mariadb.createConnection({ host: db.host, port: db.port, user: db.user, password: db.password, database: db.name })
  let tries = 0
  let otherDone: Promise<unknown> = Promise.resolve()
  const outcome = unitOfWork(t.sequelize, { idempotent }, async (tx) => {
    tries += 1
    await t.sequelize.query(`UPDATE ${TABLE} SET n = n + 1 WHERE id = 1`, { type: QueryTypes.UPDATE, transaction: tx })
    if (tries === 1) {
      await other.beginTransaction()
      await other.query(`UPDATE ${TABLE} SET n = n + 100 WHERE id >= 2`)
      // Waits for row 1, which the unit holds; once the unit is rolled back it gets it and commits.
      otherDone = other.query(`UPDATE ${TABLE} SET n = n + 100 WHERE id = 1`).then(() => other.commit())
      await new Promise((r) => setTimeout(r, 300))
    }
    await t.sequelize.query(`UPDATE ${TABLE} SET n = n + 1 WHERE id = 2`, { type: QueryTypes.UPDATE, transaction: tx })
    return tries
  })
  const settled = outcome.then(
    () => undefined,
    () => undefined,
  )
  await settled
  await otherDone
  await other.end()
  return { tries, outcome }
}

describe('the transaction helper', () => {
  it('when an idempotent unit is chosen as a deadlock victim (1213), then it runs again and commits once', async () => {
    await resetRows()
    const { tries, outcome } = await withProvokedDeadlock(true)
    await expect(outcome).resolves.toBe(2)
    expect(tries).toBe(2)
    // The other connection's +100 and exactly one +1 from the unit: the lost try left nothing.
    expect(await rowN(1)).toBe(101)
    expect(await rowN(2)).toBe(101)
  }, 30_000)

  it('when a unit not marked idempotent loses a deadlock, then it is not run again and the error reaches the caller', async () => {
    await resetRows()
    const { tries, outcome } = await withProvokedDeadlock(false)
    await expect(outcome).rejects.toMatchObject({ parent: { errno: 1213 } })
    expect(tries).toBe(1)
    expect(await rowN(1)).toBe(100)
    expect(await rowN(2)).toBe(100)
  }, 30_000)

  it('when an idempotent unit keeps losing, then it gives up after a bounded number of tries', async () => {
    let tries = 0
    const lost = Object.assign(new Error('Deadlock found when trying to get lock; try restarting transaction'), { errno: 1213 })
    await expect(
      unitOfWork(t.sequelize, { idempotent: true, attempts: 3 }, async () => {
        tries += 1
        throw lost
      }),
    ).rejects.toBe(lost)
    expect(tries).toBe(3)
  })

  /** Runs a unit whose own connection is killed by another session on its first try (as a failover cuts it). */
  type KillOptions = { idempotent: boolean; reconnectForMs?: number }
  async function withKilledConnection(opts: KillOptions): Promise<{ tries: number; outcome: Promise<unknown> }> {
    let tries = 0
    const outcome = unitOfWork(t.sequelize, opts, async (tx) => {
      tries += 1
      await t.sequelize.query(`UPDATE ${TABLE} SET n = n + 1 WHERE id = 1`, { type: QueryTypes.UPDATE, transaction: tx })
      if (tries === 1) {
        const [me] = await t.sequelize.query<{ id: number }>('SELECT CONNECTION_ID() AS id', { type: QueryTypes.SELECT, transaction: tx })
        // From another of the pool's connections: the same account, so allowed to end it.
        await t.sequelize.query(`KILL CONNECTION ${Number(me.id)}`, { type: QueryTypes.RAW })
      }
      await t.sequelize.query(`UPDATE ${TABLE} SET n = n + 1 WHERE id = 2`, { type: QueryTypes.UPDATE, transaction: tx })
      return tries
    })
    await outcome.then(
      () => undefined,
      () => undefined,
    )
    return { tries, outcome }
  }

  it('when an idempotent unit given reconnectForMs loses its connection, then it runs again on a new one and commits once', async () => {
    await resetRows()
    const { tries, outcome } = await withKilledConnection({ idempotent: true, reconnectForMs: 10_000 })
    await expect(outcome).resolves.toBe(2)
    expect(tries).toBe(2)
    // The killed try was rolled back by the server: exactly one +1 on each row.
    expect(await rowN(1)).toBe(1)
    expect(await rowN(2)).toBe(1)
  }, 30_000)

  it('when a unit without reconnectForMs loses its connection, then the error reaches the caller and nothing is saved', async () => {
    await resetRows()
    const { tries, outcome } = await withKilledConnection({ idempotent: true })
    const err = await outcome.then(
      () => null,
      (e: unknown) => e,
    )
    expect(isDatabaseUnavailable(err)).toBe(true)
    expect(tries).toBe(1)
    expect(await rowN(1)).toBe(0)
    expect(await rowN(2)).toBe(0)
  }, 30_000)

  it('when a unit fails for any other reason, then it is not run again', async () => {
    let tries = 0
    await expect(
      unitOfWork(t.sequelize, { idempotent: true }, async (tx) => {
        tries += 1
        await t.sequelize.query('SELECT * FROM no_such_table_here', { type: QueryTypes.SELECT, transaction: tx })
      }),
    ).rejects.toMatchObject({ parent: { errno: 1146 } })
    expect(tries).toBe(1)
  })
})
