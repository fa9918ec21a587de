import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import { clinicTestApp } from '../helpers/clinicApp'
import { AuditEntry, IronProductRow } from '../../server/models/index'

const clinic = clinicTestApp()
let admin: Client
beforeEach(async () => {
  admin = await clinic.signIn((await clinic.reset('admin')).admin)
})

describe('formulary and clinic settings (admin)', () => {
  it('then every product carries the caution to check it against the local formulary and prescribing information', async () => {
    const res = await admin.get('/api/formulary').expect(200)
    expect(res.body.rows.map((r: { code: string }) => r.code).sort()).toEqual([
      'ferric-carboxymaltose',
      'ferric-derisomaltose',
      'ferrous-sulfate-oral',
      'iron-sucrose',
    ])
    for (const row of res.body.rows) expect(row.caution).toMatch(/local formulary and the product's prescribing information/)
  })

  it('when an admin lowers a cap, then it is stored with an audit row of before and after', async () => {
    const res = await admin.patch('/api/formulary/iron-sucrose', { maxSingleDoseMg: 100 })
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    expect(res.body.maxSingleDoseMg).toBe(100)
    const audit = await AuditEntry.findOne({ where: { entity: 'iron-product', entityId: 'iron-sucrose' }, raw: true })
    expect(audit).toMatchObject({ before: { maxSingleDoseMg: 200 }, after: { maxSingleDoseMg: 100 } })
  })

  it('when a cap is impossible (0 mg or an oral product without its dose), then 400 and nothing changes', async () => {
    expect((await admin.patch('/api/formulary/iron-sucrose', { maxSingleDoseMg: 0 })).status).toBe(400)
    const oral = await admin.post('/api/formulary', {
      code: 'oral-x',
      name: 'Oral X',
      route: 'oral',
      maxSingleDoseMg: 60,
      minIntervalDays: 1,
      source: 'test',
    })
    expect(oral.status).toBe(400)
    expect(oral.body.error.message).toMatch(/oralDailyMg/)
    expect((await IronProductRow.findOne({ where: { code: 'iron-sucrose' } }))!.maxSingleDoseMg).toBe(200)
    expect(await IronProductRow.count({ where: { code: 'oral-x' } })).toBe(0)
  })

  it('when an admin sets the trigger, then the settings read back; an out-of-range value names the field', async () => {
    const ok = await admin.patch('/api/settings/clinic', { transfusionTriggerGL: 75 })
    expect(ok.status).toBe(200)
    expect((await admin.get('/api/settings/clinic')).body).toMatchObject({
      transfusionTriggerGL: 75,
      cardiovascularTriggerGL: 80,
      anaemiaCriteria: 'surgical',
    })
    const bad = await admin.patch('/api/settings/clinic', { transfusionTriggerGL: 30 })
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.transfusionTriggerGL).toMatch(/at least 60/)
  })
})
