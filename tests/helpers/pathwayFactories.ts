import { Patient, PatientMeasurement, Procedure, Referral, StageTransition } from '../../server/models/index'
import { addDays, todayIso, type Stage } from '../../shared/pathway'
import type { Sex } from '../../shared/clinical'
import type { Client } from './agent'
import { forgetWorklistCounts } from '../../server/services/worklistCounts'

let n = 0
const next = () => ++n

export async function makeProcedure(
  overrides: Partial<{ code: string; name: string; expectedBloodLossMl: number | null; active: boolean }> = {},
) {
  const i = next()
  return Procedure.create({
    code: overrides.code ?? `OP${i}`,
    name: overrides.name ?? `Test operation ${i}`,
    specialty: 'Orthopaedics',
    expectedBloodLossMl: overrides.expectedBloodLossMl === undefined ? 1000 : overrides.expectedBloodLossMl,
    transfusionRate: 0.1,
    usualBloodOrder: 'group-and-screen',
    usualUnits: 0,
    source: 'set locally (test)',
    active: overrides.active ?? true,
  })
}

export interface PatientOverrides {
  mrn: string
  givenName: string
  familyName: string
  dateOfBirth: string
  sex: Sex
  weightKg: number | null
}

export async function makePatient(overrides: Partial<PatientOverrides> = {}) {
  const i = next()
  const p = await Patient.create({
    mrn: overrides.mrn ?? `TST${String(i).padStart(5, '0')}`,
    givenName: overrides.givenName ?? `Given${i}`,
    familyName: overrides.familyName ?? `Family${i}`,
    dateOfBirth: overrides.dateOfBirth ?? '1960-05-15',
    sex: overrides.sex ?? 'female',
    email: null,
    phone: null,
    gpPractice: null,
    notes: null,
    createdBy: null,
  })
  if (overrides.weightKg !== null) {
    await PatientMeasurement.create({
      patientId: p.id,
      heightCm: 165,
      weightKg: overrides.weightKg ?? 70,
      measuredAt: new Date(),
      recordedBy: null,
    })
  }
  return p
}

export interface ReferralOverrides {
  stage: Stage
  plannedSurgeryDate: string
  priority: 'routine' | 'urgent' | 'cancer'
  anaemic: boolean | null
  latestHbGL: number | null
  latestHbAt: Date | null
  ironStatus: 'absolute-deficiency' | 'iron-restricted' | 'replete' | 'indeterminate' | null
  recheckDueDate: string | null
  treatmentOrderedAt: Date | null
  treatmentGivenAt: Date | null
  noResponseToIron: boolean
  hbFallingAfterIron: boolean
}

/**
 * A referral straight in the database at any stage, with screening columns set as given
 * (for worklist and transition tests that need a referral in a given state quickly).
 */
export async function makeReferral(ids: { patientId: number; procedureId: number; surgeonId: number }, o: Partial<ReferralOverrides> = {}) {
  const r = await Referral.create({
    ...ids,
    plannedSurgeryDate: o.plannedSurgeryDate ?? addDays(todayIso(), 42),
    priority: o.priority ?? 'routine',
    referringSource: null,
    stage: o.stage ?? 'referred',
    anaemiaCriteria: 'surgical',
    anaemic: o.anaemic ?? null,
    anaemiaSeverity: null,
    ironStatus: o.ironStatus ?? null,
    proposedStage: null,
    latestHbGL: o.latestHbGL ?? null,
    latestHbAt: o.latestHbAt ?? null,
    recheckDueDate: o.recheckDueDate ?? null,
    treatmentOrderedAt: o.treatmentOrderedAt ?? null,
    treatmentGivenAt: o.treatmentGivenAt ?? null,
    noResponseToIron: o.noResponseToIron ?? false,
    hbFallingAfterIron: o.hbFallingAfterIron ?? false,
    createdBy: null,
  })
  await StageTransition.create({ referralId: r.id, fromStage: null, toStage: 'referred', reason: null, userId: null })
  // Written behind the services' back, so the cached worklist totals are forgotten by hand.
  forgetWorklistCounts()
  return r
}

/** A valid registration body; tests override one field to see it refused. */
export function patientBody(overrides: Record<string, unknown> = {}) {
  const i = next()
  return {
    mrn: `KV${String(900000 + i)}`,
    givenName: 'Test',
    familyName: `Patient${i}`,
    dateOfBirth: '1958-03-09',
    sex: 'female',
    heightCm: 162,
    weightKg: 68,
    email: `patient${i}@example.test`,
    ...overrides,
  }
}

/** Registers a patient and a referral through the API, as the nurse's form does. */
export async function registerThroughApi(
  c: Client,
  ids: { procedureCode: string; surgeonId: number },
  patient: Record<string, unknown> = {},
  referral: Record<string, unknown> = {},
) {
  const p = await c.post('/api/patients', patientBody(patient))
  if (p.status !== 201) throw new Error(`patient: ${p.status} ${JSON.stringify(p.body)}`)
  const r = await c.post('/api/referrals', { patientId: p.body.id, plannedSurgeryDate: addDays(todayIso(), 42), ...ids, ...referral })
  if (r.status !== 201) throw new Error(`referral: ${r.status} ${JSON.stringify(r.body)}`)
  return { patient: p.body, referral: r.body }
}

export const hoursAgo = (h: number) => new Date(Date.now() - h * 3_600_000).toISOString()
