import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { Maildev } from '../helpers/mail'
import { loadDemoScenario } from '../../seed/load'
import { DEMO_PASSWORD } from '../../seed/demo/staff'
import { Appointment, InfusionSession, OutboxMessage } from '../../server/models/index'
import { drainOutbox } from '../../server/services/outboxWorker'

let t: TestApp
const mail = Maildev.fromEnv()
beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  await mail.clear()
  expect(await loadDemoScenario(t.sequelize)).toBe(true)
})
afterAll(async () => {
  await cleanDatabase(t.sequelize)
  await t.close()
})

describe('the demo appointments', () => {
  it('then the infusion unit has Tuesday and Thursday sessions of 6 chairs over the next four weeks', async () => {
    const sessions = await InfusionSession.findAll({ raw: true })
    expect(sessions.length).toBeGreaterThanOrEqual(7)
    expect(sessions.length).toBeLessThanOrEqual(9)
    for (const s of sessions) expect(s.chairs).toBe(6)
  })

  it('then a few patients have appointments whose e-mails are recorded as sent, and loading sent nothing', async () => {
    expect(await Appointment.count()).toBe(5)
    expect(await OutboxMessage.count({ where: { status: 'sent' } })).toBe(5)
    expect(await OutboxMessage.count({ where: { status: 'queued' } })).toBe(0)
    expect(await drainOutbox({ sequelize: t.sequelize, config: t.config })).toMatchObject({ claimed: 0 })
    expect(await mail.list()).toEqual([])
  })

  it("then the nurse's task list holds the demo patient's request to rebook", async () => {
    const c = await new Client(t.app).mustSignIn('nurse@ferrolane.test', DEMO_PASSWORD)
    const tasks = (await c.get('/api/tasks').expect(200)).body.rows
    expect(tasks).toEqual([expect.objectContaining({ kind: 'rebook-request', message: expect.stringMatching(/afternoon/) })])
  })
})
