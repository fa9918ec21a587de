import { beforeEach, describe, expect, it } from 'vitest'
import type { Client } from '../helpers/agent'
import { makeStaff, type StaffFixture } from '../helpers/factories'
import { makeEpisode } from '../helpers/clinicFactories'
import { clinicTestApp } from '../helpers/clinicApp'
import { AuditEntry, ReadinessReview, Referral, Result } from '../../server/models/index'
import { allowableBloodLoss, estimatedBloodVolume, oxygenContent } from '../../shared/clinical'
import { addDays, todayIso } from '../../shared/pathway'

const clinic = clinicTestApp()
let surgeon: StaffFixture
let otherSurgeon: StaffFixture
let asSurgeon: Client
let asDoctor: Client
let asNurse: Client

beforeEach(async () => {
  surgeon = (await clinic.reset('surgeon')).surgeon
  otherSurgeon = await makeStaff('surgeon')
  const d = await makeStaff('doctor')
  const n = await makeStaff('nurse')
  asSurgeon = await clinic.signIn(surgeon)
  asDoctor = await clinic.signIn(d)
  asNurse = await clinic.signIn(n)
})

const inDays = (d: number) => addDays(todayIso(), d)

describe('GET /api/referrals/:id/projection', () => {
  it(
    'when the iron studies on record are 150 days old, then the verdict is "results needed", naming recent iron studies, and a ' +
      'nurse sees the same',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        sex: 'male',
        heightCm: 175,
        weightKg: 70,
        hb: [{ hbGL: 140 }],
        expectedBloodLossMl: 500,
        referral: { anaemic: false, ironStatus: 'replete', plannedSurgeryDate: inDays(30) },
        iron: { ferritinUgL: 150, tsatPct: 25, takenAt: new Date(Date.now() - 150 * 86_400_000) },
      })
      for (const who of [asSurgeon, asNurse]) {
        const res = await who.get(`/api/referrals/${referral.id}/projection`)
        expect(res.status, JSON.stringify(res.body)).toBe(200)
        expect(res.body.readiness.verdict).toBe('results-needed')
        expect(res.body.readiness.missing.join(' ')).toMatch(
          /^Needs recent iron studies: ferritin of \d{4}-\d{2}-\d{2} \(1(49|50|51) days old\), TSAT/,
        )
        expect(res.body.readiness.flags).toContain('iron-studies-too-old')
      }
      // The admin's setting widens the window, and the same studies count again.
      const a = await makeStaff('admin')
      const asAdmin = await clinic.signIn(a)
      expect((await asAdmin.patch('/api/settings/clinic').send({ ironStudiesMaxAgeDays: 200 })).status).toBe(200)
      expect((await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body.readiness.verdict).toBe('ready')
    },
  )

  it(
    'when the admin sets Hb results to count for 30 days, then the setting ' + 'is kept and a 45-day-old Hb no longer clears the patient',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        sex: 'male',
        heightCm: 175,
        weightKg: 70,
        hb: [{ hbGL: 140, takenAt: new Date(Date.now() - 45 * 86_400_000) }],
        expectedBloodLossMl: 500,
        referral: { anaemic: false, ironStatus: 'replete', plannedSurgeryDate: inDays(30) },
      })
      expect((await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body.readiness.verdict).toBe('ready')
      const a = await makeStaff('admin')
      const asAdmin = await clinic.signIn(a)
      const saved = await asAdmin.patch('/api/settings/clinic').send({ resultMaxAgeDays: 30 })
      expect(saved.status).toBe(200)
      expect(saved.body.resultMaxAgeDays).toBe(30)
      const res = await asSurgeon.get(`/api/referrals/${referral.id}/projection`)
      expect(res.body.readiness.verdict).toBe('results-needed')
      expect(res.body.readiness.missing[0]).toMatch(/^Needs a recent Hb/)
    },
  )

  it('when a man of 175 cm and 70 kg with Hb 130 g/L has a 1474 mL operation, then the figures match the published formulas', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      sex: 'male',
      heightCm: 175,
      weightKg: 70,
      hb: [{ hbGL: 130 }],
      expectedBloodLossMl: 1474,
      referral: { anaemic: false, ironStatus: 'replete', plannedSurgeryDate: inDays(30) },
    })
    const res = await asSurgeon.get(`/api/referrals/${referral.id}/projection`)
    expect(res.status, JSON.stringify(res.body)).toBe(200)
    const p = res.body
    // Hand-computed from the published formulas (Nadler 1962; Bourke & Smith 1974; Gross 1983):
    expect(p.bloodVolumeMl).toBe(4824)
    expect(p.allowableBloodLossMl).toEqual({ gross: 2894, logarithmic: 2986 })
    expect(p.triggerHbGL).toBe(70) // NICE NG24
    expect(p.predictedSurgeryHbGL).toBe(130)
    expect(p.predictedPostOpHbGL).toBe(95.8)
    // …and against the clinical library itself, so the server repeats no formula of its own.
    expect(p.bloodVolumeMl).toBe(Math.round(estimatedBloodVolume({ sex: 'male', heightCm: 175, weightKg: 70 })))
    expect(p.allowableBloodLossMl.logarithmic).toBe(
      Math.round(
        allowableBloodLoss({
          ebvMl: estimatedBloodVolume({ sex: 'male', heightCm: 175, weightKg: 70 }),
          hbStartGL: 130,
          hbFloorGL: 70,
          method: 'logarithmic',
        }),
      ),
    )
    expect(p.oxygen.today.cao2MlDl).toBeCloseTo(oxygenContent({ hbGL: 130, so2: 0.97, po2MmHg: 95 }), 2)
    expect(p.bloodOrder).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'group-and-screen' })
    // A measured Hb taken today at the threshold and iron replete: the evidence for "ready" is complete.
    expect(p.readiness.verdict).toBe('ready')
    expect(p.readiness.missing).toEqual([])
    expect(p.inputs).toMatchObject({ sex: 'male', heightCm: 175, weightKg: 70, saO2: 0.97, paO2MmHg: 95, triggerHbGL: 70 })
    expect(Object.keys(p.methods)).toEqual(
      expect.arrayContaining(['bloodVolume', 'allowableBloodLoss', 'surgeryDayHb', 'oxygenContent', 'transfusionNeed', 'trigger']),
    )
    expect(p.cautions[0]).toMatch(/Decision support/)
    expect(p.assumptions.length).toBeGreaterThan(2)
  })

  it(
    'when an iron-deficient woman (160 cm, 60 kg, Hb 100) had 1000 mg IV iron 14 days ago, then the assumed rise is scaled by the ' +
      'dose and the blood order rests on her measured Hb',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        sex: 'female',
        heightCm: 160,
        weightKg: 60,
        expectedBloodLossMl: 1510,
        hb: [{ hbGL: 100, takenAt: new Date(Date.now() - 20 * 86_400_000) }],
        referral: { plannedSurgeryDate: inDays(28) },
      })
      // Give the dose through the API, 14 days ago.
      const version = (await Referral.findByPk(referral.id))!.version
      const rx = await asDoctor.post(`/api/referrals/${referral.id}/prescriptions`, {
        productCode: 'ferric-carboxymaltose',
        firstDoseDate: inDays(-14),
        version,
        cautions: { previousHypersensitivity: false, activeInfection: false, firstTrimester: false, severeLiverDisease: false },
      })
      expect(rx.status, JSON.stringify(rx.body)).toBe(201)
      const givenAt = new Date(`${inDays(-14)}T00:00:00Z`)
      await asNurse
        .post(`/api/referrals/${referral.id}/administrations`, {
          prescriptionId: rx.body.prescription.id,
          doseMg: 1000,
          givenAt: givenAt.toISOString(),
          batchNumber: 'B-77',
          reaction: 'none',
        })
        .expect(201)
      const p = (await asDoctor.get(`/api/referrals/${referral.id}/projection`)).body
      const deficitMg = rx.body.prescription.deficitMg as number
      expect(p.bloodVolumeMl).toBe(3627) // Nadler female (reference §3)
      // Stated assumption: +2.5 g/L a week from day 7 for 5 weeks, scaled by 1000 mg of the prescription's deficit.
      expect(p.predictedSurgeryHbGL).toBeCloseTo(100 + 12.5 * Math.min(1, 1000 / deficitMg), 1)
      expect(p.planningHbGL).toBe(100)
      expect(p.allowableBloodLossMl.logarithmic).toBe(1294) // 3627·ln(100/70), from the measured Hb
      // Mercuriali at 100 g/L: tolerated 326 mL < expected 371 mL → 1 unit; the assumed rise would have given group and screen.
      expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', units: 1, rule: 'red-cell-volume' })
      expect(p.readiness.verdict).toBe('consider-deferral')
      expect(p.readiness.missing.join(' ')).toMatch(/Needs a re-check after iron/)
      expect(p.methods.surgeryDayHb).toMatch(/Expected response/)
    },
  )

  it('when heart disease is recorded at review, then the 80 g/L trigger is used and deferral is suggested', async () => {
    const { referral } = await makeEpisode({
      surgeonId: surgeon.id,
      sex: 'male',
      heightCm: 175,
      weightKg: 80,
      hb: [{ hbGL: 95 }],
      expectedBloodLossMl: 750,
      referral: { plannedSurgeryDate: inDays(40) },
    })
    const version = (await Referral.findByPk(referral.id))!.version
    await asDoctor
      .post(`/api/referrals/${referral.id}/reviews`, {
        diagnosis: 'absolute-iron-deficiency',
        plan: 'IV iron, re-check in 3 weeks',
        cardiovascularDisease: true,
        version,
      })
      .expect(201)
    expect((await asDoctor.get(`/api/referrals/${referral.id}`)).body.cardiovascularDisease).toBe(true)
    const p = (await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body
    expect(p.triggerHbGL).toBe(80) // AABB 2023 (Carson, JAMA)
    expect(p.methods.trigger).toMatch(/AABB 2023/)
    expect(p.readiness.verdict).toBe('consider-deferral')
  })

  it(
    'when a 150 kg man has no height recorded, then the projection is refused with 422 naming height instead of 70 mL/kg of actual ' +
      'weight',
    async () => {
      const { referral } = await makeEpisode({ surgeonId: surgeon.id, sex: 'male', heightCm: null, weightKg: 150, hb: [{ hbGL: 120 }] })
      const res = await asDoctor.get(`/api/referrals/${referral.id}/projection`)
      expect(res.status).toBe(422)
      expect(res.body.error.fields).toHaveProperty('height')
      expect(res.body.error.message).toMatch(/height is required/)
    },
  )

  it('when the cardiac output is given, then oxygen delivery uses it; an impossible one is a 400', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, sex: 'male', heightCm: 175, weightKg: 70, hb: [{ hbGL: 130 }] })
    const p = (await asDoctor.get(`/api/referrals/${referral.id}/projection?cardiacOutputLMin=4`)).body
    expect(p.inputs.cardiacOutputLMin).toBe(4)
    expect(p.oxygen.today.do2MlMin).toBe(Math.round(4 * oxygenContent({ hbGL: 130, so2: 0.97, po2MmHg: 95 }) * 10))
    const bad = await asDoctor.get(`/api/referrals/${referral.id}/projection?cardiacOutputLMin=90`)
    expect(bad.status).toBe(400)
    expect(bad.body.error.fields.cardiacOutputLMin).toBeDefined()
  })

  it('when the weight, the Hb or the usual loss is missing, then 422 names what is missing', async () => {
    const noWeight = await makeEpisode({ surgeonId: surgeon.id, weightKg: null })
    const r1 = await asDoctor.get(`/api/referrals/${noWeight.referral.id}/projection`)
    expect(r1.status).toBe(422)
    expect(r1.body.error.fields).toHaveProperty('weightKg')
    const noHb = await makeEpisode({ surgeonId: surgeon.id, hb: [] })
    expect((await asDoctor.get(`/api/referrals/${noHb.referral.id}/projection`)).body.error.fields).toHaveProperty('hb')
    const noLoss = await makeEpisode({ surgeonId: surgeon.id, expectedBloodLossMl: null })
    const r3 = await asDoctor.get(`/api/referrals/${noLoss.referral.id}/projection`)
    expect(r3.status).toBe(422)
    expect(r3.body.error.fields).toHaveProperty('expectedBloodLossMl')
  })

  it("when another surgeon asks for this surgeon's patient, then 403", async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    const other = await clinic.signIn(otherSurgeon)
    expect((await other.get(`/api/referrals/${referral.id}/projection`)).status).toBe(403)
  })
})

describe('readiness: acknowledging and asking to move the date', () => {
  it('when the surgeon acknowledges, then the projection is stored as it was, and a later result does not rewrite it', async () => {
    const { referral, patient } = await makeEpisode({
      surgeonId: surgeon.id,
      sex: 'male',
      heightCm: 175,
      weightKg: 70,
      hb: [{ hbGL: 120 }],
    })
    const ack = await asSurgeon.post(`/api/referrals/${referral.id}/readiness`, { action: 'acknowledge' })
    expect(ack.status, JSON.stringify(ack.body)).toBe(201)
    expect(ack.body.projection.predictedSurgeryHbGL).toBe(120)
    await Result.create({
      referralId: referral.id,
      patientId: patient.id,
      analyte: 'hb',
      valueCanonical: 135,
      unitCanonical: 'g/L',
      valueReported: 135,
      unitReported: 'g/L',
      takenAt: new Date(),
      enteredBy: null,
      derivedFrom: null,
    })
    const now = (await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body
    expect(now.predictedSurgeryHbGL).toBe(135)
    const stored = await ReadinessReview.findOne({ where: { referralId: referral.id } })
    expect((stored!.projection as { predictedSurgeryHbGL: number }).predictedSurgeryHbGL).toBe(120)
  })

  it('when the surgeon asks for the date to move, then a reason is required and the episode is flagged for the clinic', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    const noReason = await asSurgeon.post(`/api/referrals/${referral.id}/readiness`, { action: 'request-date-change' })
    expect(noReason.status).toBe(400)
    expect(noReason.body.error.fields.reason).toMatch(/reason is required/)
    await asSurgeon
      .post(`/api/referrals/${referral.id}/readiness`, { action: 'request-date-change', reason: 'Hb will not be there in time' })
      .expect(201)
    const list = await asDoctor.get('/api/worklist?flag=date-change-requested')
    expect(list.body.rows.map((r: { id: number }) => r.id)).toEqual([referral.id])
    expect(list.body.rows[0].flags).toContain('date-change-requested')
  })

  it('when a nurse or another surgeon tries to acknowledge, then 403', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id })
    expect((await asNurse.post(`/api/referrals/${referral.id}/readiness`, { action: 'acknowledge' })).status).toBe(403)
    const other = await clinic.signIn(otherSurgeon)
    expect((await other.post(`/api/referrals/${referral.id}/readiness`, { action: 'acknowledge' })).status).toBe(403)
    expect(await ReadinessReview.count()).toBe(0)
  })
})

describe('PATCH /api/referrals/:id: antibody screen and transfusion refusal', () => {
  it(
    'when a doctor records a positive antibody screen, then the episode keeps it, the audit trail names it and the projection ' +
      'crossmatches',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        sex: 'male',
        heightCm: 175,
        weightKg: 70,
        hb: [{ hbGL: 140 }],
        expectedBloodLossMl: 500,
        referral: { anaemic: false, ironStatus: 'replete', plannedSurgeryDate: inDays(30) },
      })
      const version = (await Referral.findByPk(referral.id))!.version
      const res = await asDoctor.patch(`/api/referrals/${referral.id}`, { version, redCellAntibodies: true })
      expect(res.status, JSON.stringify(res.body)).toBe(200)
      expect(res.body).toMatchObject({ redCellAntibodies: true, declinesTransfusion: false })
      const audit = await AuditEntry.findOne({ where: { entity: 'referral', action: 'update', entityId: String(referral.id) } })
      expect(JSON.stringify(audit?.after)).toContain('redCellAntibodies')
      const p = (await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body
      expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', rule: 'antibodies' })
      expect(p.readiness.flags).toContain('red-cell-antibodies')
    },
  )

  it(
    'when a nurse records that the patient declines transfusion, then the plan prompts cell salvage and tranexamic acid and no ' +
      'units are crossmatched',
    async () => {
      const { referral } = await makeEpisode({
        surgeonId: surgeon.id,
        sex: 'female',
        heightCm: 160,
        weightKg: 60,
        hb: [{ hbGL: 100 }],
        expectedBloodLossMl: 1510,
        referral: { plannedSurgeryDate: inDays(30) },
      })
      const version = (await Referral.findByPk(referral.id))!.version
      await asNurse.patch(`/api/referrals/${referral.id}`, { version, declinesTransfusion: true }).expect(200)
      const p = (await asSurgeon.get(`/api/referrals/${referral.id}/projection`)).body
      expect(p.bloodOrder).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'declines-transfusion' })
      expect(p.readiness.plan.join(' ')).toMatch(/Cell salvage.*Tranexamic acid/s)
    },
  )

  it('when the antibody screen is sent as a word, then 400 names the field and nothing changes', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, referral: { plannedSurgeryDate: inDays(30) } })
    const version = (await Referral.findByPk(referral.id))!.version
    const res = await asDoctor.patch(`/api/referrals/${referral.id}`, { version, redCellAntibodies: 'positive' })
    expect(res.status).toBe(400)
    expect(res.body.error.fields.redCellAntibodies).toMatch(/true, false or null/)
    expect((await Referral.findByPk(referral.id))!.redCellAntibodies).toBeNull()
  })

  it('when a surgeon tries to record the antibody screen, then 403', async () => {
    const { referral } = await makeEpisode({ surgeonId: surgeon.id, referral: { plannedSurgeryDate: inDays(30) } })
    const version = (await Referral.findByPk(referral.id))!.version
    expect((await asSurgeon.patch(`/api/referrals/${referral.id}`, { version, redCellAntibodies: true })).status).toBe(403)
  })
})

describe('GET /api/readiness (the board)', () => {
  it('when a surgeon opens the board, then only their patients in the next 8 weeks appear, each with a verdict', async () => {
    const mine = await makeEpisode({
      surgeonId: surgeon.id,
      sex: 'male',
      heightCm: 175,
      weightKg: 70,
      hb: [{ hbGL: 132 }],
      referral: { anaemic: false, ironStatus: 'replete', plannedSurgeryDate: inDays(10) },
    })
    const missing = await makeEpisode({ surgeonId: surgeon.id, weightKg: null, referral: { plannedSurgeryDate: inDays(20) } })
    await makeEpisode({ surgeonId: surgeon.id, referral: { plannedSurgeryDate: inDays(70) } }) // beyond 8 weeks
    await makeEpisode({ surgeonId: otherSurgeon.id, referral: { plannedSurgeryDate: inDays(12) } })
    const res = await asSurgeon.get('/api/readiness')
    expect(res.status).toBe(200)
    expect(res.body.rows.map((r: { id: number }) => r.id)).toEqual([mine.referral.id, missing.referral.id])
    expect(res.body.rows[0]).toMatchObject({
      verdict: 'ready',
      predictedSurgeryHbGL: 132,
      bloodOrder: { kind: 'group-and-screen', units: 0 },
    })
    expect(res.body.rows[1].verdict).toBeNull()
    expect(res.body.rows[1].missing).toMatch(/weight/)
  })

  it('when filtered by operation, then only that operation appears; a surgeon asking for another surgeon is refused', async () => {
    const a = await makeEpisode({ surgeonId: surgeon.id, referral: { plannedSurgeryDate: inDays(10) } })
    await makeEpisode({ surgeonId: surgeon.id, referral: { plannedSurgeryDate: inDays(11) } })
    const res = await asSurgeon.get(`/api/readiness?procedureCode=${a.procedure.code}`)
    expect(res.body.rows.map((r: { id: number }) => r.id)).toEqual([a.referral.id])
    expect((await asSurgeon.get(`/api/readiness?surgeonId=${otherSurgeon.id}`)).status).toBe(403)
    expect((await asSurgeon.get('/api/readiness?from=soon')).status).toBe(400)
  })
})
