import type { TreatmentGiven } from '../../shared/clinic/evidence'
import { BloodVolumeRefusal, ClinicalInputError } from '../../shared/clinical'
import { buildProjection, type Projection } from '../../shared/clinic/projection'
import type { IronStatus } from '../../shared/clinical'
import { getClinicSettings } from './clinicSettings'
import { latestIronStudies } from './screening'
import { recordAudit } from './audit'
import { clinicalFacts, loadReferral, type LoadedReferral } from './episode'
import { Prescription } from '../models/index'
import type { Viewer } from './viewer'
import { RuleRefused } from '../errors'
import { clinicTimeZone, clinicToday } from './clinicDay'

export interface ProjectionOptions {
  cardiacOutputLMin?: number
}

/**
 * The surgery-day projection for one episode, from today's data. What it cannot know it does not
 * invent: a missing weight, Hb or usual blood loss is a 422 that names it.
 */
export async function projectionForReferral(r: LoadedReferral, opts: ProjectionOptions = {}): Promise<Projection> {
  const [facts, settings, ironStudies] = await Promise.all([clinicalFacts(r), getClinicSettings(), latestIronStudies(r.id)])
  const missing: Record<string, string> = {}
  if (facts.body.weightKg == null) missing.weightKg = "the patient's weight is not recorded"
  if (facts.body.heightCm == null) missing.height = new BloodVolumeRefusal().message
  if (!facts.hb.length) missing.hb = 'no Hb result is recorded'
  if (r.procedure.expectedBloodLossMl == null)
    missing.expectedBloodLossMl = `the operation "${r.procedure.name}" has no usual blood loss in the catalogue`
  if (Object.keys(missing).length) {
    throw new RuleRefused(`Cannot project surgery day: ${Object.values(missing).join('; ')}`, 'projection_inputs_missing', missing)
  }
  let treatment: TreatmentGiven | null = null
  if (facts.doses.length) {
    const first = facts.doses[0]!
    const p = await Prescription.findByPk(first.prescriptionId)
    treatment = {
      kind: p?.route ?? 'iv',
      firstDoseAt: first.givenAt,
      lastDoseAt: facts.doses[facts.doses.length - 1]!.givenAt,
      totalMg: facts.doses.reduce((s, d) => s + d.doseMg, 0),
      // The deficit the course was written against: the dose given is weighed against it.
      deficitMg: p?.deficitMg ?? null,
    }
  }
  try {
    return buildProjection(
      {
        today: clinicToday(),
        timeZone: clinicTimeZone(),
        plannedSurgeryDate: r.plannedSurgeryDate,
        sex: r.patient.sex,
        heightCm: facts.body.heightCm,
        weightKg: facts.body.weightKg!,
        hbMeasurements: facts.hb,
        treatment,
        procedure: {
          code: r.procedure.code,
          name: r.procedure.name,
          expectedBloodLossMl: r.procedure.expectedBloodLossMl!,
          usualBloodOrder: r.procedure.usualBloodOrder,
          usualUnits: r.procedure.usualUnits,
          transfusionRate: r.procedure.transfusionRate,
        },
        priority: r.priority,
        cardiovascularDisease: Boolean(r.cardiovascularDisease),
        ironStatus: (r.ironStatus as IronStatus | null) ?? null,
        ironStudies,
        antibodiesPositive: r.redCellAntibodies ?? null,
        declinesTransfusion: Boolean(r.declinesTransfusion),
        saO2: settings.defaultSaO2,
        paO2MmHg: settings.defaultPaO2MmHg,
        cardiacOutputLMin: opts.cardiacOutputLMin ?? null,
      },
      settings,
    )
  } catch (err) {
    // The record holds something the formulas refuse (e.g. an implausible stored figure).
    if (err instanceof ClinicalInputError)
      throw new RuleRefused(`Cannot project surgery day: ${err.message}`, 'projection_input_invalid', { [err.input]: err.message })
    throw err
  }
}

export async function projectionFor(viewer: Viewer, referralId: number, opts: ProjectionOptions = {}): Promise<Projection> {
  const r = await loadReferral(viewer, referralId)
  const projection = await projectionForReferral(r, opts)
  // Audited once the projection exists, so a refusal (missing inputs) is not logged as a view.
  await recordAudit(null, viewer, { action: 'view', entity: 'projection', entityId: referralId, patientId: r.patientId })
  return projection
}
