import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, type TestApp } from '../helpers/app'
import { rawSelect } from '../../server/services/rawRead'

/**
 * The per-request reads sent through the driver (server/services/rawRead.ts: the session lookup,
 * the worklist) must send a time as the same UTC instant whatever the process's time zone: the
 * session lookup compares `expires_at > :now`, so a shifted `now` would keep expired sessions
 * alive (or end live ones) by the zone's offset.
 */
let t: TestApp
beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})

describe('reads sent through the driver', () => {
  it('when the process runs in another time zone, then a time parameter reaches MariaDB as the same UTC instant', async () => {
    const zone = process.env.TZ
    process.env.TZ = 'Pacific/Auckland'
    try {
      // The zone took effect: 09:00 UTC on 1 March is 22:00 in Auckland (NZDT, UTC+13).
      expect(new Date('2026-03-01T09:00:00.123Z').getHours()).toBe(22)
      const rows = await rawSelect<{ at: string }>(t.sequelize, "SELECT DATE_FORMAT(:at, '%Y-%m-%dT%H:%i:%s.%f') AS at", {
        at: new Date('2026-03-01T09:00:00.123Z'),
      })
      expect(rows[0]!.at).toBe('2026-03-01T09:00:00.123000')
    } finally {
      if (zone === undefined) delete process.env.TZ
      else process.env.TZ = zone
    }
  })
})
