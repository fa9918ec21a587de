import type { Transaction } from 'sequelize'
import { Patient, PatientMeasurement, Procedure, Referral, Result, StageTransition, User } from '../../server/models/index'
import { screeningOutcome } from '../../shared/clinic/screening'
import { egfrCkdEpi2021 } from '../../shared/clinical'
import { DEFAULT_ANAEMIA_CRITERIA, addDays, findMove, type Stage } from '../../shared/pathway'
import { clinicToday } from '../../server/services/clinicDay'
import { DEMO_EPISODES, type DemoEpisode } from './patients'
import { DEMO_PROCEDURES } from './procedures'

const DAY = 86_400_000
const SURGEONS = { calder: 'surgeon@ferrolane.test', mensah: 'k.mensah@ferrolane.test', whitlow: 'j.whitlow@ferrolane.test' } as const
const ACTORS = { nurse: 'nurse@ferrolane.test', doctor: 'doctor@ferrolane.test', surgeon: 'surgeon@ferrolane.test' } as const

/** When each stage is reached, in days after referral: the clinic's usual rhythm. */
function stageDay(stage: Stage, e: DemoEpisode, previous: number): number {
  const first = e.hb?.[0]?.[0] ?? 1
  const recheckHb = e.hb?.[1]?.[0]
  const surgery = e.referredDaysAgo + e.surgeryInDays
  const day: Partial<Record<Stage, number>> = {
    screened: first + 1,
    clinic: first + 3,
    treating: first + 7,
    recheck: first + 10,
    cleared: (recheckHb ?? first) + 1,
    operated: surgery,
    closed: surgery + 7,
  }
  return Math.max(previous + 0.1, day[stage] ?? previous + 2)
}

async function userIds(t: Transaction): Promise<Map<string, number>> {
  const users = await User.findAll({ attributes: ['id', 'email'], transaction: t, raw: true })
  return new Map(users.map((u) => [u.email, u.id]))
}

/** Loads the catalogue and the invented episodes, stage history and results included. */
export async function loadDemoEpisodes(t: Transaction): Promise<void> {
  const procedures = await Procedure.bulkCreate(
    DEMO_PROCEDURES.map((p) => ({ ...p, active: true })),
    { transaction: t },
  )
  const procId = new Map(procedures.map((p) => [p.code, p.id]))
  const users = await userIds(t)
  const now = Date.now()
  // The clinic's calendar day, so surgery and re-check dates match the flags' "today".
  const today = clinicToday()
  for (const [i, e] of DEMO_EPISODES.entries()) {
    const referredAt = now - e.referredDaysAgo * DAY
    const at = (day: number) => new Date(Math.min(referredAt + day * DAY, now - (DEMO_EPISODES.length - i) * 60_000))
    const dob = addDays(today, -Math.round(e.age * 365.25) - i * 11)
    const patient = await Patient.create(
      {
        mrn: `KV${100200 + i * 37}`,
        givenName: e.given,
        familyName: e.family,
        dateOfBirth: dob,
        sex: e.sex,
        email: `${e.given}.${e.family}@example.test`.toLowerCase(),
        phone: `01632 960 ${String(100 + i * 7).slice(-3)}`,
        gpPractice: i % 2 ? 'Vale Road Surgery (demo)' : 'Kestrel Lane Medical Centre (demo)',
        notes: null,
        createdBy: users.get(ACTORS.nurse)!,
        createdAt: new Date(referredAt),
        updatedAt: new Date(referredAt),
      },
      { transaction: t },
    )
    await PatientMeasurement.create(
      { patientId: patient.id, heightCm: e.cm, weightKg: e.kg, measuredAt: new Date(referredAt), recordedBy: users.get(ACTORS.nurse)! },
      { transaction: t },
    )

    // The stage history, each move by a role the pathway allows.
    const moves: { from: Stage | null; to: Stage; at: Date; userId: number; reason: string | null }[] = [
      { from: null, to: 'referred', at: new Date(referredAt), userId: users.get(ACTORS.nurse)!, reason: null },
    ]
    let day = 0
    for (const to of e.path) {
      const from = moves[moves.length - 1]!.to
      const move = findMove(from, to)
      if (!move) throw new Error(`Demo data: ${e.family} cannot move ${from} → ${to}`)
      day = stageDay(to, e, day)
      const role = move.roles[0] as keyof typeof ACTORS
      const userId = role === 'surgeon' ? users.get(SURGEONS[e.surgeon])! : users.get(ACTORS[role])!
      moves.push({ from, to, at: at(day), userId, reason: move.requiresReason ? (e.reason ?? 'Recorded in clinic') : null })
    }
    const stage = moves[moves.length - 1]!.to
    const treated = moves.find((m) => m.to === 'treating')
    const givenAt = treated && !e.notGiven ? new Date(treated.at.getTime() + DAY) : null
    const referral = await Referral.create(
      {
        patientId: patient.id,
        procedureId: procId.get(e.op)!,
        surgeonId: users.get(SURGEONS[e.surgeon])!,
        plannedSurgeryDate: addDays(today, e.surgeryInDays),
        priority: e.priority ?? 'routine',
        referringSource: `${DEMO_PROCEDURES.find((p) => p.code === e.op)!.specialty} outpatients (demo)`,
        stage,
        anaemiaCriteria: DEFAULT_ANAEMIA_CRITERIA,
        anaemic: null,
        anaemiaSeverity: null,
        ironStatus: null,
        proposedStage: null,
        latestHbGL: null,
        latestHbAt: null,
        recheckDueDate: e.recheckInDays !== undefined ? addDays(today, e.recheckInDays) : null,
        treatmentOrderedAt: treated?.at ?? null,
        treatmentGivenAt: givenAt,
        createdBy: users.get(ACTORS.nurse)!,
        version: moves.length,
        createdAt: new Date(referredAt),
        updatedAt: moves[moves.length - 1]!.at,
      },
      { transaction: t },
    )
    await StageTransition.bulkCreate(
      moves.map((m) => ({ referralId: referral.id, fromStage: m.from, toStage: m.to, reason: m.reason, userId: m.userId, at: m.at })),
      { transaction: t },
    )
    await loadResults(t, e, referral, patient, at, users.get(ACTORS.nurse)!)
  }
}

async function loadResults(
  t: Transaction,
  e: DemoEpisode,
  referral: Referral,
  patient: Patient,
  at: (day: number) => Date,
  nurseId: number,
) {
  if (!e.hb?.length) return
  const base = { referralId: referral.id, patientId: patient.id, enteredBy: nurseId, source: 'manual', derivedFrom: null }
  const row = (analyte: string, value: number, unit: string, takenAt: Date) => ({
    ...base,
    analyte: analyte as 'hb',
    valueCanonical: value,
    unitCanonical: unit,
    valueReported: value,
    unitReported: unit,
    takenAt,
  })
  const first = at(e.hb[0]![0])
  const rows = e.hb.map(([day, hb]) => row('hb', hb, 'g/L', at(day)))
  if (e.iron) {
    rows.push(row('ferritin', e.iron.ferritin, 'µg/L', first), row('tsat', e.iron.tsat, '%', first), row('crp', e.iron.crp, 'mg/L', first))
    rows.push(row('mcv', e.iron.ferritin < 30 ? 77 : 89, 'fL', first))
  }
  const creatinine = e.sex === 'female' ? 68 : 84
  rows.push(row('creatinine', creatinine, 'µmol/L', first))
  const egfr = egfrCkdEpi2021({ creatinineUmolL: creatinine, ageYears: e.age, sex: e.sex })
  rows.push({
    ...row('egfr', Math.round(egfr * 10) / 10, 'mL/min/1.73 m²', first),
    valueReported: null as unknown as number,
    unitReported: null as unknown as string,
    source: 'derived',
  })
  await Result.bulkCreate(rows, { transaction: t })
  const last = e.hb[e.hb.length - 1]!
  const outcome = screeningOutcome(
    { hb: { value: last[1], takenAt: at(last[0]) }, ferritin: e.iron?.ferritin, tsat: e.iron?.tsat, crp: e.iron?.crp },
    e.sex,
    DEFAULT_ANAEMIA_CRITERIA,
  )
  await Referral.update(outcome, { where: { id: referral.id }, transaction: t })
}
