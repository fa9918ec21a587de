import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { loadDemoScenario } from '../../seed/load'
import { DEMO_PASSWORD } from '../../seed/demo/staff'
import { Patient, Procedure, Referral, StageTransition } from '../../server/models/index'
import { STAGES, WORKLIST_FLAGS, findMove } from '../../shared/pathway'

let t: TestApp
beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  expect(await loadDemoScenario(t.sequelize)).toBe(true)
})
afterAll(async () => {
  await cleanDatabase(t.sequelize)
  await t.close()
})

describe('the demo scenario', () => {
  it('then it holds about forty invented patients, every stage, and the catalogue with a source on each operation', async () => {
    expect(await Patient.count()).toBe(40)
    const stages = new Set((await Referral.findAll({ attributes: ['stage'], raw: true })).map((r) => r.stage))
    expect([...stages].sort()).toEqual([...STAGES].sort())
    const procedures = await Procedure.findAll({ raw: true })
    expect(procedures.length).toBeGreaterThanOrEqual(10)
    for (const p of procedures) expect(p.source.length, p.code).toBeGreaterThan(5)
    for (const p of await Patient.findAll({ raw: true })) {
      expect(p.mrn).toMatch(/^KV\d+$/)
      expect(p.email).toMatch(/@example\.test$/)
    }
  })

  it("then each episode's stage history is a chain of allowed moves ending at its stage", async () => {
    for (const r of await Referral.findAll({ raw: true })) {
      const history = await StageTransition.findAll({
        where: { referralId: r.id },
        order: [
          ['at', 'ASC'],
          ['id', 'ASC'],
        ],
        raw: true,
      })
      expect(history[0]).toMatchObject({ fromStage: null, toStage: 'referred' })
      for (const h of history.slice(1)) expect(findMove(h.fromStage!, h.toStage), `${h.fromStage}→${h.toStage}`).toBeDefined()
      expect(history[history.length - 1]!.toStage).toBe(r.stage)
    }
  })

  it('then the nurse sees every worklist flag raised somewhere on the list', async () => {
    const nurse = await new Client(t.app).mustSignIn('nurse@ferrolane.test', DEMO_PASSWORD)
    const res = await nurse.get('/api/worklist?pageSize=100').expect(200)
    expect(res.body.total).toBe(40)
    const raised = new Set(res.body.rows.flatMap((r: { flags: string[] }) => r.flags))
    for (const f of WORKLIST_FLAGS) expect(raised.has(f), f).toBe(true)
    const surgeon = await new Client(t.app).mustSignIn('surgeon@ferrolane.test', DEMO_PASSWORD)
    const own = await surgeon.get('/api/worklist?pageSize=100').expect(200)
    expect(own.body.total).toBeGreaterThan(5)
    expect(own.body.total).toBeLessThan(40)
  })
})
