import { afterAll, beforeAll, beforeEach, describe, expect, it } from 'vitest'
import { makeTestApp, cleanDatabase, clearAuditTrail, type TestApp } from '../helpers/app'
import { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { hoursAgo, makePatient, makeProcedure, makeReferral, type ReferralOverrides } from '../helpers/pathwayFactories'
import { AuditEntry, Outcome, Referral, StageTransition } from '../../server/models/index'
import { TRANSITIONS, allowedMoves, todayIso } from '../../shared/pathway'
import { ROLES, type Role } from '../../shared/roles'

let t: TestApp
const staff = {} as Record<Role, StaffFixture>
const as = {} as Record<Role, Client>
let ids: { patientId: number; procedureId: number; surgeonId: number }

// Sign-ins are slow (password hashing), so one client per role for the whole file; the
// clinical tables are emptied before each test instead of the whole database.
beforeAll(async () => {
  t = makeTestApp()
  await cleanDatabase(t.sequelize)
  for (const role of ROLES) {
    staff[role] = await makeStaff(role)
    as[role] = await new Client(t.app).mustSignIn(staff[role].email, staff[role].password)
  }
})
afterAll(async () => {
  await t.close()
})
beforeEach(async () => {
  await StageTransition.destroy({ where: {} })
  await clearAuditTrail(t.sequelize)
  await Referral.destroy({ where: {} })
  const patient = await makePatient()
  const procedure = await makeProcedure()
  ids = { patientId: patient.id, procedureId: procedure.id, surgeonId: staff.surgeon.id }
})

const screenedHb = { latestHbGL: 118, latestHbAt: new Date(Date.now() - 3_600_000), anaemic: true }
const at = (o: Partial<ReferralOverrides>) => makeReferral(ids, { ...screenedHb, ...o })
const move = (role: Role, id: number, body: object) => as[role].post(`/api/referrals/${id}/transitions`, body)
// Closing after surgery needs the post-operative record and its follow-up on file (tests/api/outcomes-closing covers the refusal).
const followUpOnFile = (referralId: number) =>
  Outcome.create({
    referralId,
    surgeryDate: todayIso(),
    bloodLossMl: 300,
    unitsTransfusedIntraOp: 0,
    unitsTransfusedPostOp: 0,
    unitsCrossmatched: 0,
    lowestHbGL: 110,
    dischargeHbGL: 112,
    lengthOfStayDays: 3,
    complications: ['none'],
    recordedBy: null,
    followUpRecheckHbGL: 120,
    followUpRecheckDate: todayIso(),
    followUpIronAfterSurgery: false,
    followUpAt: new Date(),
  })

describe('who may make each move (the pathway table in shared/pathway)', () => {
  it('then every move in the table succeeds for exactly the roles it names and is 403 for the others', async () => {
    for (const m of TRANSITIONS) {
      for (const role of ['nurse', 'doctor', 'surgeon'] as const) {
        const r = await at({ stage: m.from })
        if (m.requires === 'follow-up') await followUpOnFile(r.id)
        const res = await move(role, r.id, { to: m.to, version: 1, reason: 'Patient asked to postpone' })
        const want = m.roles.includes(role) ? 200 : 403
        expect(res.status, `${m.from} → ${m.to} as ${role}: ${JSON.stringify(res.body)}`).toBe(want)
      }
    }
  })

  it('when an administrator tries any move, then 403 (admins manage the service, not patients)', async () => {
    const r = await at({ stage: 'referred' })
    expect((await move('admin', r.id, { to: 'screened', version: 1 })).status).toBe(403)
  })

  it('when a surgeon reads an episode, then allowedMoves offers only their moves', async () => {
    const r = await at({ stage: 'cleared' })
    const res = await as.surgeon.get(`/api/referrals/${r.id}`).expect(200)
    expect(res.body.allowedMoves.map((m: { to: string }) => m.to).sort()).toEqual(['deferred', 'operated', 'withdrawn'])
    expect(res.body.allowedMoves).toEqual(allowedMoves('cleared', 'surgeon'))
  })

  it("when a surgeon tries to move another surgeon's patient, then 403", async () => {
    const other = await makeStaff('surgeon')
    const r = await makeReferral({ ...ids, surgeonId: other.id }, { ...screenedHb, stage: 'cleared' })
    expect((await move('surgeon', r.id, { to: 'operated', version: 1 })).status).toBe(403)
  })
})

describe('pathway rules', () => {
  it(
    'when a nurse confirms screening with an Hb on file, then 200, the version goes up and the move is stored with who, when, from, ' +
      'to and why',
    async () => {
      const r = await at({ stage: 'referred' })
      const res = await move('nurse', r.id, { to: 'screened', version: 1, reason: 'Bloods reviewed' })
      expect(res.status).toBe(200)
      expect(res.body).toMatchObject({ id: r.id, stage: 'screened', stageLabel: 'Screening to confirm', version: 2 })
      const row = await StageTransition.findOne({ where: { referralId: r.id, toStage: 'screened' }, raw: true })
      expect(row).toMatchObject({ fromStage: 'referred', toStage: 'screened', reason: 'Bloods reviewed', userId: staff.nurse.id })
      expect(row!.at).toBeInstanceOf(Date)
      const audit = await AuditEntry.findOne({ where: { action: 'transition', entityId: String(r.id) }, raw: true })
      expect(audit).toMatchObject({
        userId: staff.nurse.id,
        patientId: ids.patientId,
        before: { stage: 'referred' },
        after: { stage: 'screened', reason: 'Bloods reviewed' },
      })
      expect(res.body.timeline[0]).toMatchObject({ kind: 'transition', from: 'referred', to: 'screened', user: { id: staff.nurse.id } })
    },
  )

  it('when there is no Hb result yet, then moving to screened is refused with 422 and nothing changes', async () => {
    const r = await makeReferral(ids, { stage: 'referred' })
    const res = await move('nurse', r.id, { to: 'screened', version: 1 })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('hb_result_required')
    expect(await Referral.findByPk(r.id, { raw: true })).toMatchObject({ stage: 'referred', version: 1 })
  })

  it('when the version sent is stale, then 409 and nothing changes (no stage, no history row, no audit)', async () => {
    const r = await at({ stage: 'referred' })
    await move('nurse', r.id, { to: 'screened', version: 1 }).expect(200)
    const before = { transitions: await StageTransition.count(), audit: await AuditEntry.count() }
    // A second nurse still looking at version 1 tries to send the patient elsewhere.
    const res = await move('doctor', r.id, { to: 'withdrawn', version: 1, reason: 'Duplicate referral' })
    expect(res.status).toBe(409)
    expect(res.body.error.code).toBe('stale_version')
    expect(await Referral.findByPk(r.id, { raw: true })).toMatchObject({ stage: 'screened', version: 2 })
    expect({ transitions: await StageTransition.count(), audit: await AuditEntry.count() }).toEqual(before)
  })

  it('when two moves race with the same version, then exactly one wins and the other gets 409', async () => {
    const r = await at({ stage: 'screened' })
    const [a, b] = await Promise.all([
      move('nurse', r.id, { to: 'clinic', version: 1 }),
      move('doctor', r.id, { to: 'cleared', version: 1 }),
    ])
    expect([a.status, b.status].sort()).toEqual([200, 409])
    expect(await StageTransition.count({ where: { referralId: r.id } })).toBe(2) // creation + the winner
  })

  for (const to of ['deferred', 'withdrawn'] as const) {
    it(`when moving to ${to} without a reason, then 422 names reason and nothing changes`, async () => {
      const r = await at({ stage: 'clinic' })
      for (const reason of [undefined, '', '   ']) {
        const res = await move('doctor', r.id, { to, version: 1, ...(reason === undefined ? {} : { reason }) })
        expect(res.status).toBe(422)
        expect(res.body.error.fields.reason).toBeDefined()
      }
      expect(await Referral.findByPk(r.id, { raw: true })).toMatchObject({ stage: 'clinic', version: 1 })
    })
  }

  it('when a deferred episode comes back, then it re-enters the pathway at screening', async () => {
    const r = await at({ stage: 'clinic' })
    await move('doctor', r.id, { to: 'deferred', version: 1, reason: 'Hb too low for a hip; treat first' }).expect(200)
    const res = await move('nurse', r.id, { to: 'referred', version: 2 })
    expect(res.status).toBe(200)
    expect(res.body.stage).toBe('referred')
  })

  it('when the move is not in the table from this stage, then 422 and the message says where it can go', async () => {
    const r = await at({ stage: 'referred' })
    const res = await move('doctor', r.id, { to: 'operated', version: 1 })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('move_not_allowed')
    expect(res.body.error.message).toMatch(/screened/)
  })

  it('when the episode is closed, then moves, results and edits are refused with 422 (read-only)', async () => {
    const r = await at({ stage: 'operated' })
    await followUpOnFile(r.id)
    await move('nurse', r.id, { to: 'closed', version: 1 }).expect(200)
    for (const to of ['referred', 'operated', 'withdrawn']) {
      const res = await move('doctor', r.id, { to, version: 2, reason: 'x' })
      expect(res.status).toBe(422)
      expect(res.body.error.code).toBe('closed_read_only')
    }
    expect(
      (await as.nurse.post(`/api/referrals/${r.id}/results`, { analyte: 'hb', value: 120, unit: 'g/L', takenAt: hoursAgo(1) })).status,
    ).toBe(422)
    expect((await as.nurse.patch(`/api/referrals/${r.id}`, { version: 2, priority: 'urgent' })).status).toBe(422)
    const detail = await as.doctor.get(`/api/referrals/${r.id}`).expect(200)
    expect(detail.body).toMatchObject({ readOnly: true, allowedMoves: [] })
  })

  it('when the target stage is not a stage, then 400 names to', async () => {
    const r = await at({ stage: 'referred' })
    const res = await move('nurse', r.id, { to: 'somewhere', version: 1 })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.to).toMatch(/to must be one of/)
  })

  it('when version is missing, then 400 names version', async () => {
    const r = await at({ stage: 'referred' })
    const res = await move('nurse', r.id, { to: 'screened' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.version).toBeDefined()
  })

  it('when the referral does not exist, then 404', async () => {
    expect((await move('nurse', 999999, { to: 'screened', version: 1 })).status).toBe(404)
  })
})
