import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'
import { Maildev, freePort } from '../helpers/mail'
import { at, bookingFixture, summerDay, type BookingFixture } from '../helpers/appointmentFactories'
import { startMaildev, type MaildevHandle } from '../../scripts/lib/maildev'
import { OutboxWorker, drainOutbox } from '../../server/services/outboxWorker'
import { OutboxMessage } from '../../server/models/index'

// This file runs its own maildev so it can stop and start it without touching the shared one.
let t: TestApp
let smtpPort: number
let webPort: number
let relay: MaildevHandle | null = null
let mail: Maildev
let f: BookingFixture
let nurse: Client

const startRelay = async () => {
  relay = await startMaildev({ smtpPort, webPort, label: 'outbox-test' })
}
const stopRelay = async () => {
  await relay?.stop()
  relay = null
}

beforeAll(async () => {
  smtpPort = await freePort()
  webPort = await freePort()
  mail = new Maildev(webPort)
  await startRelay()
  t = makeTestApp({ SMTP_PORT: String(smtpPort), OUTBOX_MAX_ATTEMPTS: '3', OUTBOX_RETRY_BASE_SECONDS: '60' })
})
afterAll(async () => {
  await t.close()
  await stopRelay()
})
beforeEach(async () => {
  if (!relay) await startRelay()
  await cleanDatabase(t.sequelize)
  await mail.clear()
  f = await bookingFixture()
  nurse = await new Client(t.app).mustSignIn(f.nurse.email, f.nurse.password)
})

const opts = () => ({ sequelize: t.sequelize, config: t.config })
const book = (day: string, hhmm = '09:00') =>
  nurse
    .post('/api/appointments', {
      referralId: f.referralId,
      kind: 'recheck-bloods',
      startsAt: at(day, hhmm),
      durationMin: 15,
      location: 'Phlebotomy, Level 0',
    })
    .expect(201)
const minutesFromNow = (m: number) => new Date(Date.now() + m * 60_000)

describe('when the mail relay is down', () => {
  it('then messages wait in the outbox and go once it is back, each exactly once', async () => {
    await stopRelay()
    await book(summerDay())
    await book(summerDay(1))
    const down = await drainOutbox(opts())
    expect(down).toMatchObject({ claimed: 2, sent: 0, retried: 2 })
    const waiting = await OutboxMessage.findAll({ raw: true })
    expect(waiting.map((m) => [m.status, m.attempts])).toEqual([
      ['queued', 1],
      ['queued', 1],
    ])
    expect(waiting[0]!.lastError).toMatch(/ECONNREFUSED|connect/i)
    // The first retry waits OUTBOX_RETRY_BASE_SECONDS; nothing is claimed before then.
    expect((await drainOutbox(opts())).claimed).toBe(0)

    await startRelay()
    expect(await drainOutbox({ ...opts(), now: minutesFromNow(2) })).toMatchObject({ sent: 2 })
    expect(await drainOutbox({ ...opts(), now: minutesFromNow(60) })).toMatchObject({ claimed: 0 })
    const got = await mail.to(f.email)
    expect(got).toHaveLength(2)
    expect(new Set(got.map((m) => m.subject)).size).toBe(2)
  })

  it(
    'then after OUTBOX_MAX_ATTEMPTS failures the message is marked ' + 'failed, with backoff doubling in between, and staff see it',
    async () => {
      await stopRelay()
      const { body } = await book(summerDay())
      const row = () => OutboxMessage.findByPk(body.message.id, { raw: true })
      let now = new Date()
      await drainOutbox({ ...opts(), now })
      const first = (await row())!
      expect(first.nextAttemptAt.getTime() - now.getTime()).toBe(60_000)
      now = new Date(first.nextAttemptAt.getTime() + 1)
      await drainOutbox({ ...opts(), now })
      const second = (await row())!
      expect(second.nextAttemptAt.getTime() - now.getTime()).toBe(120_000)
      await drainOutbox({ ...opts(), now: new Date(second.nextAttemptAt.getTime() + 1) })
      expect(await row()).toMatchObject({ status: 'failed', attempts: 3 })
      const nurse = await makeStaff('nurse')
      const c = await new Client(t.app).mustSignIn(nurse.email, nurse.password)
      const listed = (await c.get('/api/outbox?status=failed').expect(200)).body.rows
      expect(listed).toEqual([
        expect.objectContaining({ id: body.message.id, status: 'failed', attempts: 3, lastError: expect.any(String) }),
      ])
    },
  )
})

describe('with two workers', () => {
  it('when both drain the same queue at once, then every message is delivered exactly once', async () => {
    for (let i = 0; i < 12; i++) await book(summerDay(i), '08:00')
    const a = new OutboxWorker({ ...opts(), workerId: 'worker-a', batchSize: 2 })
    const b = new OutboxWorker({ ...opts(), workerId: 'worker-b', batchSize: 2 })
    const [ra, rb] = await Promise.all([a.drain(), b.drain()])
    await Promise.all([a.stop(), b.stop()])
    expect(ra.sent + rb.sent).toBe(12)
    const got = await mail.to(f.email)
    expect(got).toHaveLength(12)
    const outboxIds = got.map((m) => m.headers['x-ferrolane-outbox-id'])
    expect(new Set(outboxIds).size).toBe(12)
    expect(await OutboxMessage.count({ where: { status: 'sent' } })).toBe(12)
  })

  it('when a worker died mid-send, then its message is sent once after the lease ends, and a live lease is left alone', async () => {
    const crashed = (await book(summerDay())).body.message.id
    const live = (await book(summerDay(1))).body.message.id
    const past = new Date(Date.now() - 1000)
    await OutboxMessage.update({ status: 'sending', claimedBy: 'dead-worker', claimedUntil: past, attempts: 1 }, { where: { id: crashed } })
    await OutboxMessage.update(
      { status: 'sending', claimedBy: 'busy-worker', claimedUntil: minutesFromNow(5), attempts: 1 },
      { where: { id: live } },
    )
    expect(await drainOutbox(opts())).toMatchObject({ claimed: 1, sent: 1 })
    expect(await OutboxMessage.findByPk(crashed, { raw: true })).toMatchObject({ status: 'sent', attempts: 2, claimedBy: null })
    expect(await OutboxMessage.findByPk(live, { raw: true })).toMatchObject({ status: 'sending', claimedBy: 'busy-worker' })
    expect(await mail.to(f.email)).toHaveLength(1)
  })

  it(
    'when an earlier message to the same appointment is still waiting, then the later one waits too (a cancellation never overtakes ' +
      'its booking)',
    async () => {
      const { body } = await book(summerDay())
      await stopRelay()
      await drainOutbox(opts())
      await nurse.post(`/api/appointments/${body.appointment.id}/cancel`, { reason: 'No longer needed' }).expect(200)
      await startRelay()
      // Before the booking's retry is due: the cancellation must not go alone.
      expect(await drainOutbox(opts())).toMatchObject({ claimed: 0 })
      await drainOutbox({ ...opts(), now: minutesFromNow(2) })
      expect((await mail.to(f.email)).map((m) => m.subject.split(':')[0])).toEqual([
        'Your hospital appointment is booked',
        'Your hospital appointment is cancelled',
      ])
    },
  )
})
