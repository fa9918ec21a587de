import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { BaseError, QueryTypes, UniqueConstraintError, type Transaction } from 'sequelize'
import { makeTestApp, type TestApp } from '../helpers/app'
import { rawInTransaction } from '../../server/services/rawTransaction'
import { isDatabaseUnavailable } from '../../server/dbUnavailable'

/**
 * The driver path of the bulk import statements (server/services/rawTransaction.ts) against the
 * real test MariaDB: it must store a time as the same UTC instant whatever the process's time
 * zone, and fail as Sequelize's path fails (a duplicate key, a lost connection answered 503).
 * Each case works in a temporary table of its own transaction, so no shared table is touched.
 */
let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})

async function withProbe(work: (tx: Transaction) => Promise<void>): Promise<void> {
  const tx = await t.sequelize.transaction()
  try {
    await t.sequelize.query('CREATE TEMPORARY TABLE raw_tx_probe (n INT PRIMARY KEY, at DATETIME(3) NULL, v DOUBLE NULL)', {
      type: QueryTypes.RAW,
      transaction: tx,
    })
    await work(tx)
  } finally {
    await t.sequelize.query('DROP TEMPORARY TABLE IF EXISTS raw_tx_probe', { type: QueryTypes.RAW, transaction: tx }).catch(() => undefined)
    await tx.rollback().catch(() => undefined)
  }
}

describe('bulk statements sent through the driver on a transaction', () => {
  it('when the process runs in another time zone, then a time is stored as the same UTC instant', async () => {
    const zone = process.env.TZ
    process.env.TZ = 'Pacific/Auckland'
    try {
      // The zone took effect: 09:00 UTC on 1 March is 22:00 in Auckland (NZDT, UTC+13).
      expect(new Date('2026-03-01T09:00:00.123Z').getHours()).toBe(22)
      await withProbe(async (tx) => {
        await rawInTransaction(t.sequelize, tx, 'INSERT INTO raw_tx_probe (n, at, v) VALUES (?, ?, ?), (?, ?, ?)', [
          1,
          new Date('2026-03-01T09:00:00.123Z'),
          4.25,
          2,
          null,
          null,
        ])
        const rows = await rawInTransaction<{ n: number; at: string; v: number | null }[]>(
          t.sequelize,
          tx,
          "SELECT n, DATE_FORMAT(at, '%Y-%m-%dT%H:%i:%s.%f') AS at, v FROM raw_tx_probe ORDER BY n",
          [],
        )
        expect(rows.map((r) => ({ ...r }))).toEqual([
          { n: 1, at: '2026-03-01T09:00:00.123000', v: 4.25 },
          { n: 2, at: null, v: null },
        ])
      })
    } finally {
      if (zone === undefined) delete process.env.TZ
      else process.env.TZ = zone
    }
  })

  it('when a row repeats a unique key, then the error is the UniqueConstraintError Sequelize gives', async () => {
    await withProbe(async (tx) => {
      await rawInTransaction(t.sequelize, tx, 'INSERT INTO raw_tx_probe (n) VALUES (?)', [7])
      await expect(rawInTransaction(t.sequelize, tx, 'INSERT INTO raw_tx_probe (n) VALUES (?)', [7])).rejects.toBeInstanceOf(
        UniqueConstraintError,
      )
    })
  })

  it(
    'when the transaction connection is lost, then the error is a Sequelize error that ' + 'counts as the database unavailable (503)',
    async () => {
      const tx = await t.sequelize.transaction()
      try {
        const [{ id }] = await t.sequelize.query<{ id: number }>('SELECT CONNECTION_ID() AS id', {
          type: QueryTypes.SELECT,
          transaction: tx,
        })
        await t.sequelize.query(`KILL CONNECTION ${Number(id)}`, { type: QueryTypes.RAW })
        await new Promise((r) => setTimeout(r, 200))
        const err = await rawInTransaction(t.sequelize, tx, 'SELECT ?', [1]).then(
          () => null,
          (e: unknown) => e,
        )
        expect(err).toBeInstanceOf(BaseError)
        expect(isDatabaseUnavailable(err)).toBe(true)
      } finally {
        await tx.rollback().catch(() => undefined)
      }
    },
  )
})
