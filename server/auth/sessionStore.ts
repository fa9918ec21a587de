import session from 'express-session'
import { Op } from 'sequelize'
import { SessionRow } from '../models/index'
import { rawSelect } from '../services/rawRead'

const TOUCH_EVERY_MS = 60_000

type Callback = (err?: unknown, value?: session.SessionData | null) => void

function userIdOf(sess: session.SessionData): number | null {
  const id = (sess as { passport?: { user?: unknown } }).passport?.user
  return typeof id === 'number' ? id : null
}

function expiryOf(sess: session.SessionData, fallbackMs: number): Date {
  const expires = sess.cookie?.expires
  return expires ? new Date(expires) : new Date(Date.now() + fallbackMs)
}

/**
 * express-session store on the app's own MariaDB, so sessions survive a restart and are shared
 * by several server processes. The user id is a column, so deactivating a user ends their sessions.
 */
export class MariaDbSessionStore extends session.Store {
  /** When this process last pushed each session's expiry forward. */
  private readonly touchedAt = new Map<string, number>()

  constructor(private readonly idleMs: number) {
    super()
  }

  override get(sid: string, cb: Callback): void {
    // Runs on every request: straight through the driver, without Sequelize's query path.
    rawSelect<{ data: string }>(SessionRow.sequelize!, 'SELECT data FROM sessions WHERE sid = :sid AND expires_at > :now', {
      sid,
      now: new Date(),
    })
      .then((rows) => cb(null, rows[0] ? (JSON.parse(rows[0].data) as session.SessionData) : null))
      .catch((err) => cb(err))
  }

  override set(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    SessionRow.upsert({ sid, userId: userIdOf(sess), data: JSON.stringify(sess), expiresAt: expiryOf(sess, this.idleMs) })
      .then(() => cb?.())
      .catch((err) => cb?.(err))
  }

  override touch(sid: string, sess: session.SessionData, cb?: (err?: unknown) => void): void {
    // A rolling session is touched on every request; moving its expiry more than once a minute
    // buys nothing against a 30-minute idle timeout and costs a row lock per request.
    const now = Date.now()
    if (now - (this.touchedAt.get(sid) ?? 0) < TOUCH_EVERY_MS) return void cb?.()
    this.touchedAt.set(sid, now)
    if (this.touchedAt.size > 10_000) this.touchedAt.clear()
    SessionRow.update({ expiresAt: expiryOf(sess, this.idleMs) }, { where: { sid } })
      .then(() => cb?.())
      .catch((err) => cb?.(err))
  }

  override destroy(sid: string, cb?: (err?: unknown) => void): void {
    this.touchedAt.delete(sid)
    SessionRow.destroy({ where: { sid } })
      .then(() => cb?.())
      .catch((err) => cb?.(err))
  }

  /** Expired rows are dead weight; the server sweeps them now and then. */
  async sweep(): Promise<number> {
    return SessionRow.destroy({ where: { expiresAt: { [Op.lte]: new Date() } } })
  }
}
