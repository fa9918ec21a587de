import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { Maildev } from '../helpers/mail'
import { bookedAppointment, replyTokenIn, type BookingFixture } from '../helpers/appointmentFactories'
import { createMailTransport } from '../../server/mail/transport'
import { AppointmentReplyToken } from '../../server/models/index'
import { loadConfig } from '../../server/config'

let t: TestApp
const mail = Maildev.fromEnv()
let f: BookingFixture
let patient: Client
let appointmentId: number

beforeAll(() => {
  t = makeTestApp()
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  const b = await bookedAppointment(t, mail, { givenName: 'Wren', location: 'Outpatients B' })
  expect(b.booked.status, JSON.stringify(b.booked.body)).toBe(201)
  f = b.f
  appointmentId = b.appointmentId
  patient = b.patient
})

describe('patient e-mail', () => {
  it('then the subject, the sender name and the calendar title say only "hospital appointment"; the body says what it is', async () => {
    const [m] = await mail.to(f.email)
    expect(m!.subject).toMatch(/^Your hospital appointment is booked: /)
    const visible = [m!.subject, JSON.stringify(m!.from)].join(' ')
    expect(visible).not.toMatch(/anaemi|iron|infusion|blood/i)
    expect(m!.text).toContain('Anaemia clinic appointment')
    const ics = await mail.attachment(m!, '.ics')
    expect(ics).toMatch(/SUMMARY:Hospital appointment/)
    expect(ics).not.toMatch(/SUMMARY:[^\r\n]*(anaemi|iron|infusion)/i)
  })

  it('when a reply link is older than REPLY_LINK_DAYS, then it answers 410 and says so', async () => {
    const token = replyTokenIn((await mail.to(f.email))[0]!)
    await patient.get(`/api/replies/${token}`).expect(200)
    const old = new Date(Date.now() - (t.config.replies.linkDays * 86_400_000 + 60_000))
    await t.sequelize.query('UPDATE reply_tokens SET created_at = ? WHERE appointment_id = ?', { replacements: [old, appointmentId] })
    const res = await patient.get(`/api/replies/${token}`)
    expect(res.status).toBe(410)
    expect(res.body.error).toMatchObject({ code: 'reply_link_expired', message: expect.stringMatching(/work for 14 days/) })
    expect((await patient.post(`/api/replies/${token}/confirm`)).status).toBe(410)
    expect(loadConfig({}).replies.linkDays).toBe(14)
  })

  it('when a newer link has been sent for the appointment (a reminder), then only the newest works', async () => {
    const first = replyTokenIn((await mail.to(f.email))[0]!)
    // A second message for the same appointment, as a reminder would send.
    await AppointmentReplyToken.create({ appointmentId, tokenHash: 'f'.repeat(64), outboxMessageId: null })
    const res = await patient.get(`/api/replies/${first}`)
    expect(res.status).toBe(410)
    expect(res.body.error.code).toBe('reply_link_superseded')
  })
})

describe('the SMTP connection', () => {
  // The test relay (maildev) offers STARTTLS with a self-signed, expired certificate.
  it("when SMTP_REQUIRE_TLS is on and the relay's certificate does not verify, then nothing is sent", async () => {
    const config = loadConfig({ ...process.env, NODE_ENV: 'test', SMTP_REQUIRE_TLS: 'true' })
    expect(config.smtp).toMatchObject({ requireTls: true, tlsRejectUnauthorized: true })
    const transport = createMailTransport(config.smtp)
    await expect(transport.sendMail({ from: config.smtp.from, to: 'tls.check@hospital.test', subject: 'x', text: 'x' })).rejects.toThrow(
      /certificate/i,
    )
    expect(await mail.to('tls.check@hospital.test')).toHaveLength(0)
    transport.close()
  })

  it("when the operator accepts the relay's certificate, then the message goes over TLS", async () => {
    const config = loadConfig({ ...process.env, NODE_ENV: 'test', SMTP_REQUIRE_TLS: 'true', SMTP_TLS_REJECT_UNAUTHORIZED: 'false' })
    const transport = createMailTransport(config.smtp)
    await transport.sendMail({ from: config.smtp.from, to: 'tls.ok@hospital.test', subject: 'x', text: 'x' })
    expect(await mail.to('tls.ok@hospital.test')).toHaveLength(1)
    transport.close()
  })
})
