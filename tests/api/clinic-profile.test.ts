import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff } from '../helpers/factories'

// The client shows appointment times in the zone this answers with, so it must be the server's
// CLINIC_TIME_ZONE and not a constant in the client.
let t: TestApp
let nurseCreds: { email: string; password: string }

beforeAll(async () => {
  t = makeTestApp({ CLINIC_TIME_ZONE: 'America/New_York', CLINIC_NAME: 'Harbour Test Infirmary' })
  await cleanDatabase(t.sequelize)
  nurseCreds = await makeStaff('nurse')
})
afterAll(async () => {
  await t.close()
})

describe('GET /api/clinic-profile', () => {
  it('when signed in, then it names the configured zone and clinic', async () => {
    const nurse = await new Client(t.app).mustSignIn(nurseCreds.email, nurseCreds.password)
    const res = await nurse.get('/api/clinic-profile')
    expect(res.status).toBe(200)
    expect(res.body).toMatchObject({
      timeZone: 'America/New_York',
      zoneLabel: 'America/New York',
      zoneName: 'local time (America/New_York)',
      name: 'Harbour Test Infirmary',
    })
  })

  it('when not signed in, then 401', async () => {
    expect((await new Client(t.app).get('/api/clinic-profile')).status).toBe(401)
  })
})
