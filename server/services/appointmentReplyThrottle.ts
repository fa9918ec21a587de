import { Op, QueryTypes } from 'sequelize'
import type { Config } from '../config'
import { AppointmentReplyFailure } from '../models/index'
import { TooMany } from '../errors'

const bucketOf = (ip: string) => `address:${ip}`
const windowStart = (config: Config) => new Date(Date.now() - config.replies.windowMinutes * 60_000)

/** Refuses every reply from an address that has tried too many unknown links lately. */
export async function assertNotThrottled(config: Config, ip: string): Promise<void> {
  const row = await AppointmentReplyFailure.findOne({
    where: { bucket: bucketOf(ip), windowStartedAt: { [Op.gte]: windowStart(config) } },
    raw: true,
  })
  if ((row?.failures ?? 0) >= config.replies.maxBadTokensPerAddress) {
    throw new TooMany(
      `Too many links we could not recognise came from your connection. Wait ${config.replies.windowMinutes} minutes and open ` +
        `the link from your e-mail again, or call the ${config.clinic.service} on ${config.clinic.phone}.`,
    )
  }
}

/** One statement, so unknown links tried in parallel (or on several servers) all count. */
export async function countBadToken(config: Config, ip: string): Promise<void> {
  const since = windowStart(config)
  await AppointmentReplyFailure.sequelize!.query(
    `INSERT INTO reply_failures (bucket, failures, window_started_at) VALUES (?, 1, NOW())
     ON DUPLICATE KEY UPDATE
       failures = IF(window_started_at < ?, 1, failures + 1),
       window_started_at = IF(window_started_at < ?, NOW(), window_started_at)`,
    { replacements: [bucketOf(ip), since, since], type: QueryTypes.INSERT },
  )
}
