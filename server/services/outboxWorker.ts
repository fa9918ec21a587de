import type { Logger } from 'pino'
import type { InferAttributes } from 'sequelize'
import { hostname } from 'node:os'
import { randomBytes } from 'node:crypto'
import { QueryTypes, literal as sequelizeLiteral, type Sequelize } from 'sequelize'
import type { Transporter } from 'nodemailer'
import type { Config } from '../config'
import { AppointmentReplyToken, OutboxMessage } from '../models/index'
import { composeMail } from '../mail/compose'
import { carriesReplyLink } from '../mail/snapshot'
import { createMailTransport, SMTP_SEND_BUDGET_MS } from '../mail/transport'
import { newReplyToken } from './appointmentTokens'
import { queueDueReminders } from './appointmentReminders'
import { unitOfWork } from '../unitOfWork'

type Row = InferAttributes<OutboxMessage>
export interface RunResult {
  claimed: number
  sent: number
  retried: number
  failed: number
  bounced: number
  reminders: number
}

export interface WorkerOptions {
  sequelize: Sequelize
  config: Config
  /** Names this worker in claimed_by; two processes must differ. */
  workerId?: string
  transport?: Transporter
  batchSize?: number
  /** Where a failed pass is reported (class and codes only: see observability/logger). */
  log?: Pick<Logger, 'error'>
}

/** Longest wait between retries, however many attempts have failed. */
const MAX_BACKOFF_MS = 6 * 3_600_000

/**
 * How long an outcome (above all 'sent') is retried while the database is unreachable. A failover
 * takes under 10 s here (Galera evicts a dead node after 6 s, HAProxy marks it down after 2 s);
 * 30 s covers it with room. The lease (OUTBOX_LEASE_SECONDS, at least 90) is longer than this
 * plus SMTP_SEND_BUDGET_MS, which is what lets a worker finish recording before anyone re-claims.
 */
export const OUTCOME_RETRY_MS = 30_000

/**
 * Sends the outbox. A claim is a compare-and-set per message: an UPDATE that takes the row only
 * if it is still in the state this worker read (due, same attempt count), and whose affected-row
 * count says whether this worker won. Row locks (FOR UPDATE SKIP LOCKED) would be local to one
 * node of a Galera cluster; a write set is certified cluster-wide, so two workers connected to
 * different nodes cannot both win: the loser's UPDATE matches no row, or loses certification
 * (error 1213) and is tried again by unitOfWork, then matches no row.
 * Sending happens after the claim; the outcome is written only if this worker still holds the
 * claim. A worker that dies mid-send leaves its rows 'sending' until the lease ends, then any
 * worker takes them again.
 *
 * Exactly once, as far as this process can make it: once the relay has accepted a message, the
 * 'sent' outcome is written through unitOfWork for up to OUTCOME_RETRY_MS across a lost database
 * connection (a Galera node killed under this worker and HAProxy moving the writer route take a
 * few seconds), and a message is only sent while the claim has at least that long plus the SMTP
 * time budget left, so no other worker can take it back meanwhile. What remains: the process
 * itself dying (SIGKILL, power) between the relay's "250 accepted" and that commit, a window of
 * one database round trip; the message then goes again after the lease, with the same Message-ID.
 */
export class OutboxWorker {
  readonly workerId: string
  private readonly transport: Transporter
  private timer: NodeJS.Timeout | null = null
  private running: Promise<unknown> = Promise.resolve()
  private stopped = false
  /** By this process's clock, when the claims of the current batch end (the pass's `now` may be a test's). */
  private leaseEndsAt = 0

  constructor(private readonly opts: WorkerOptions) {
    this.workerId = opts.workerId ?? `${hostname()}:${process.pid}:${randomBytes(3).toString('hex')}`
    this.transport = opts.transport ?? createMailTransport(opts.config.smtp)
  }

  private get config(): Config {
    return this.opts.config
  }

  /** Claims due messages for this worker; an older message to the same appointment goes first. */
  async claim(now: Date): Promise<Row[]> {
    const { sequelize } = this.opts
    const lease = new Date(now.getTime() + this.config.outbox.leaseSeconds * 1000)
    this.leaseEndsAt = Date.now() + this.config.outbox.leaseSeconds * 1000
    const due = await sequelize.query<{ id: number; attempts: number }>(
      `SELECT o.id, o.attempts FROM outbox_messages o
       WHERE ((o.status = 'queued' AND o.next_attempt_at <= ?) OR (o.status = 'sending' AND o.claimed_until < ?))
         AND NOT EXISTS (SELECT 1 FROM outbox_messages e WHERE e.appointment_id = o.appointment_id AND e.id < o.id AND e.status
           IN ('queued', 'sending'))
       ORDER BY o.id LIMIT ?`,
      { replacements: [now, now, this.opts.batchSize ?? 10], type: QueryTypes.SELECT },
    )
    const won: number[] = []
    for (const row of due) {
      const changed = await unitOfWork(sequelize, { idempotent: true }, async (transaction) => {
        const [, affected] = await sequelize.query(
          `UPDATE outbox_messages SET status = 'sending', claimed_by = ?, claimed_until = ?, attempts = attempts + 1, updated_at = ?
           WHERE id = ? AND attempts = ?
             AND ((status = 'queued' AND next_attempt_at <= ?) OR (status = 'sending' AND claimed_until < ?))`,
          { replacements: [this.workerId, lease, now, row.id, row.attempts, now, now], type: QueryTypes.UPDATE, transaction },
        )
        return affected
      })
      if (changed === 1) won.push(row.id)
    }
    if (!won.length) return []
    return OutboxMessage.findAll({ where: { id: won, claimedBy: this.workerId }, order: [['id', 'ASC']], raw: true })
  }

  /**
   * Writes a claimed message's outcome, retried across a failover (see OUTCOME_RETRY_MS). Safe to
   * run again after a commit whose answer was lost: the row is then no longer ours and 'sending'.
   */
  private async finish(id: number, changes: Partial<Row>): Promise<void> {
    const where = { id, claimedBy: this.workerId, status: 'sending' as const }
    await unitOfWork(this.opts.sequelize, { idempotent: true, reconnectForMs: OUTCOME_RETRY_MS }, (transaction) =>
      OutboxMessage.update({ ...changes, claimedBy: null, claimedUntil: null }, { where, transaction }),
    )
  }

  /** Hands claims back untouched (due at once) when too little of the lease is left to send them safely. */
  private async release(ids: number[], now: Date): Promise<void> {
    if (!ids.length) return
    await OutboxMessage.update(
      { status: 'queued', claimedBy: null, claimedUntil: null, nextAttemptAt: now, attempts: sequelizeLiteral('attempts - 1') },
      { where: { id: ids, claimedBy: this.workerId, status: 'sending' } },
    )
  }

  /** Sends one claimed message; the reply link's token exists only if the send went through. */
  private async sendOne(m: Row, now: Date): Promise<'sent' | 'retried' | 'failed' | 'bounced'> {
    let tokenId: number | null = null
    let info: { messageId?: string }
    try {
      let token: string | null = null
      if (carriesReplyLink(m.kind) && m.appointmentId) {
        const t = newReplyToken()
        tokenId = (await AppointmentReplyToken.create({ appointmentId: m.appointmentId, tokenHash: t.hash, outboxMessageId: m.id })).id
        token = t.token
      }
      const mail = composeMail(this.config, m.kind, m.payload, token)
      info = await this.transport.sendMail({
        from: this.config.smtp.from,
        to: m.toAddress,
        subject: mail.subject,
        text: mail.text,
        html: mail.html,
        // One Message-ID per outbox row: if a crash ever makes us send again, mail systems can tell.
        messageId: `<outbox-${m.id}@ferrolane>`,
        headers: { 'X-Ferrolane-Outbox-Id': String(m.id) },
        attachments: [
          {
            filename: mail.ics.filename,
            content: mail.ics.content,
            contentType: `text/calendar; charset=utf-8; method=${mail.ics.method}`,
          },
        ],
      })
    } catch (err) {
      if (tokenId) await AppointmentReplyToken.destroy({ where: { id: tokenId } }).catch(() => {})
      const e = err as { responseCode?: number; message?: string }
      const lastError = String(e.message ?? err).slice(0, 1000)
      // A 5xx answer is the relay refusing this message for good (unknown mailbox, policy).
      if (e.responseCode && e.responseCode >= 500) {
        await this.finish(m.id, { status: 'bounced', lastError })
        return 'bounced'
      }
      if (m.attempts >= this.config.outbox.maxAttempts) {
        await this.finish(m.id, { status: 'failed', lastError })
        return 'failed'
      }
      const delay = Math.min(this.config.outbox.retryBaseSeconds * 1000 * 2 ** (m.attempts - 1), MAX_BACKOFF_MS)
      await this.finish(m.id, { status: 'queued', lastError, nextAttemptAt: new Date(now.getTime() + delay) })
      return 'retried'
    }
    // Outside the try: the relay has the message, so a database failure here must never be taken
    // for a failed send (that would queue it again). If this throws, the pass stops; the row stays
    // 'sending' and goes again only after the lease (the one window left, see the class comment).
    await this.finish(m.id, { status: 'sent', smtpMessageId: String(info.messageId ?? ''), sentAt: new Date(), lastError: null })
    return 'sent'
  }

  /** One pass: queue due reminders, claim one batch, send it. Tests call this directly. */
  async runOnce(opts: { now?: Date } = {}): Promise<RunResult> {
    const now = opts.now ?? new Date()
    const result: RunResult = { claimed: 0, sent: 0, retried: 0, failed: 0, bounced: 0, reminders: 0 }
    result.reminders = await queueDueReminders(this.opts.sequelize, this.config, now)
    const batch = await this.claim(now)
    result.claimed = batch.length
    for (const [i, m] of batch.entries()) {
      // A send started later than this could still be recording its outcome when the lease ends.
      if (Date.now() + SMTP_SEND_BUDGET_MS + OUTCOME_RETRY_MS > this.leaseEndsAt) {
        await this.release(
          batch.slice(i).map((r) => r.id),
          now,
        )
        result.claimed = i
        break
      }
      result[await this.sendOne(m, now)] += 1
    }
    return result
  }

  /** Passes until nothing is due (messages put back for a later retry end the loop). */
  async drain(opts: { now?: Date } = {}): Promise<RunResult> {
    const total: RunResult = { claimed: 0, sent: 0, retried: 0, failed: 0, bounced: 0, reminders: 0 }
    for (;;) {
      const r = await this.runOnce(opts)
      for (const k of Object.keys(total) as (keyof RunResult)[]) total[k] += r[k]
      if (r.claimed === 0) return total
    }
  }

  /** Polls every OUTBOX_POLL_MS in the server process until stop(). */
  start(): void {
    const tick = () => {
      if (this.stopped) return
      this.running = this.drain()
        .catch((err) => this.opts.log?.error({ err }, 'outbox pass failed; will try again'))
        .finally(() => {
          if (!this.stopped) this.timer = setTimeout(tick, this.config.outbox.pollMs)
        })
    }
    this.timer = setTimeout(tick, 0)
  }

  /** Lets the pass in progress finish (its claims are honoured), then closes SMTP. */
  async stop(): Promise<void> {
    this.stopped = true
    if (this.timer) clearTimeout(this.timer)
    await this.running
    this.transport.close()
  }
}

/** The single-call form tests and scripts use: send everything due now, once. */
export function drainOutbox(opts: WorkerOptions & { now?: Date }): Promise<RunResult> {
  const w = new OutboxWorker(opts)
  return w.drain({ now: opts.now }).finally(() => w.stop())
}
