import {
  allowableBloodLoss,
  bsaMosteller,
  classifyAnaemia,
  hbAfterIsovolaemicLoss,
  isIronDeficient,
  patientBloodVolume,
  oxygenContent,
  oxygenDelivery,
  projectHb,
  redCellTransfusionNeed,
  HCT_FROM_HB_ASSUMPTION,
  type HbMeasurement,
  type IronStatus,
  type Sex,
} from '../clinical'
import type { ClinicSettings } from './settings'
import { TRIGGER_SOURCES } from './settings'
import { readinessVerdict, type ReadinessVerdict } from './verdict'
import { gatherEvidence, type Evidence, type TreatmentGiven } from './evidence'
import type { IronStudies } from './ironStudies'
import { decideBloodOrder, type BloodOrderDecision } from './bloodOrder'
import { DECISION_SUPPORT_CAUTION } from './readiness'

/** Everything the projection uses; returned as `inputs` so every figure can be recomputed. */
export interface ProjectionInputs {
  /** The clinic's today (todayInZone) and the zone it was read in. */
  today: string
  timeZone: string
  plannedSurgeryDate: string
  sex: Sex
  heightCm: number | null
  weightKg: number
  hbMeasurements: HbMeasurement[]
  treatment: TreatmentGiven | null
  procedure: {
    code: string
    name: string
    expectedBloodLossMl: number
    usualBloodOrder: string
    usualUnits: number
    transfusionRate: number | null
  }
  priority: string
  cardiovascularDisease: boolean
  ironStatus: IronStatus | null
  /**
   * The latest ferritin, TSAT and CRP with their sample times. The server always sends them, so
   * the verdict judges iron status on recent studies only; without them `ironStatus` is used.
   */
  ironStudies?: IronStudies
  /** Recorded on the episode: positive red-cell antibody screen (null: not recorded). */
  antibodiesPositive: boolean | null
  declinesTransfusion: boolean
  saO2: number
  paO2MmHg: number
  /** Given by the user; otherwise cardiac index × body surface area. */
  cardiacOutputLMin: number | null
}

export interface OxygenPoint {
  hbGL: number
  cao2MlDl: number
  do2MlMin: number
}

export interface Projection {
  inputs: ProjectionInputs & {
    cardiacOutputLMin: number
    triggerHbGL: number
    settings: Pick<
      ClinicSettings,
      'anaemiaCriteria' | 'transfusionTriggerGL' | 'cardiovascularTriggerGL' | 'resultMaxAgeDays' | 'ironStudiesMaxAgeDays'
    >
  }
  methods: Record<string, string>
  bloodVolumeMl: number
  triggerHbGL: number
  currentHbGL: number
  predictedSurgeryHbGL: number
  /** The Hb the blood order, allowable loss and verdict rest on: the lower of the latest measured and the projection. */
  planningHbGL: number
  evidence: Evidence
  predictedPostOpHbGL: number
  allowableBloodLossMl: { gross: number; logarithmic: number }
  expectedBloodLossMl: number
  oxygen: { today: OxygenPoint; surgeryDay: OxygenPoint; postOp: OxygenPoint }
  transfusionNeed: { toleratedRedCellMl: number; expectedRedCellLossMl: number; deficitMl: number; units: number }
  bloodOrder: BloodOrderDecision
  readiness: ReadinessVerdict
  assumptions: string[]
  cautions: string[]
}

const r0 = (x: number) => Math.round(x)
const r1 = (x: number) => Math.round(x * 10) / 10
const r2 = (x: number) => Math.round(x * 100) / 100

/**
 * The surgery-day projection for one patient and one operation, from the clinical library.
 * Pure: the server assembles the inputs from the record and answers with this object.
 */
export function buildProjection(input: ProjectionInputs, settings: ClinicSettings): Projection {
  const assumptions: string[] = []
  const cautions: string[] = [DECISION_SUPPORT_CAUTION]
  const methods: Record<string, string> = {}

  // Nadler below BMI 30, Lemmens 2006 at or above it; without a height this throws
  // BloodVolumeRefusal (the server answers 422 naming height) rather than use 70 mL/kg of actual
  // weight, which overstates blood volume in obesity by up to half.
  const bv = patientBloodVolume({ sex: input.sex, heightCm: input.heightCm, weightKg: input.weightKg })
  const ebv = bv.ml
  methods.bloodVolume = bv.methodName
  if (bv.method === 'lemmens') {
    cautions.push(
      `BMI ${Math.round(bv.bmi)}: blood volume is estimated for lean mass (Lemmens 2006), because fat holds little blood; the ` +
        `allowable loss is smaller than weight-based figures would suggest.`,
    )
  }

  const triggerHbGL = input.cardiovascularDisease ? settings.cardiovascularTriggerGL : settings.transfusionTriggerGL
  methods.trigger = input.cardiovascularDisease ? TRIGGER_SOURCES.cardiovascular : TRIGGER_SOURCES.standard

  const measured = [...input.hbMeasurements].sort((a, b) => +new Date(a.takenAt) - +new Date(b.takenAt))
  const evidence = gatherEvidence({
    today: input.today,
    timeZone: input.timeZone,
    hb: measured,
    ironStatus: input.ironStatus,
    treatment: input.treatment,
    resultMaxAgeDays: settings.resultMaxAgeDays,
    ...(input.ironStudies ? { ironStudies: input.ironStudies, ironStudiesMaxAgeDays: settings.ironStudiesMaxAgeDays } : {}),
  })
  const currentHbGL = evidence.latest?.hbGL ?? measured[measured.length - 1]!.hbGL
  const target = input.plannedSurgeryDate > input.today ? input.plannedSurgeryDate : input.today
  const t = input.treatment
  const hbProjection = projectHb({
    targetDate: target,
    timeZone: input.timeZone,
    measurements: measured,
    treatment: t
      ? { kind: t.kind, firstDoseDate: t.firstDoseAt, totalMg: t.totalMg, ...(t.deficitMg ? { deficitMg: t.deficitMg } : {}) }
      : undefined,
    // Without a calculated deficit the dose cannot be weighed against the need, so no rise is assumed.
    ...(t && !t.deficitMg ? { assumption: { riseGLPerWeek: 0 } } : {}),
  })
  if (t && !t.deficitMg) assumptions.push('No calculated iron deficit is on record for the iron given, so no rise is assumed from it.')
  const surgeryHb = hbProjection.hbGL
  const assumesRise = hbProjection.method === 'expected-response' && surgeryHb > currentHbGL
  // Only measured values may lower the blood order or clear the patient: the plan rests on the
  // lower of the latest measured Hb and the projection (a falling trend still counts in full).
  const planningHb = Math.min(surgeryHb, currentHbGL)
  methods.surgeryDayHb = {
    trend: 'Measured trend since treatment (least-squares line through the results)',
    'expected-response': 'Expected response to the iron given (stated assumption, no re-check yet)',
    'latest-value': 'Latest measured Hb',
  }[hbProjection.method]
  methods.planningHb =
    'Blood order, allowable loss and the verdict use the lower of the latest measured Hb and the projection: an assumed rise ' +
    'never lowers them'
  assumptions.push(...hbProjection.assumptions)

  const lossMl = input.procedure.expectedBloodLossMl
  const postOpHb = hbAfterIsovolaemicLoss({ ebvMl: ebv, hbStartGL: planningHb, lossMl })
  methods.postOpHb = `Isovolaemic dilution Hb × e^(−loss/EBV) after the usual loss for ${input.procedure.name}, no transfusion`
  assumptions.push('Blood volume is kept up with clear fluid during surgery (normovolaemia); all blood-loss figures assume it.')

  const abl = {
    gross: allowableBloodLoss({ ebvMl: ebv, hbStartGL: planningHb, hbFloorGL: triggerHbGL, method: 'gross' }),
    logarithmic: allowableBloodLoss({ ebvMl: ebv, hbStartGL: planningHb, hbFloorGL: triggerHbGL, method: 'logarithmic' }),
  }
  methods.allowableBloodLoss =
    `Gross 1983 (Anesthesiology 58:277) and logarithmic (Bourke & Smith 1974), from the planning Hb to the trigger, with blood ` +
    `volume by ${bv.method === 'lemmens' ? 'Lemmens 2006' : 'Nadler 1962'}`

  // A height is on record here: patientBloodVolume refuses the projection without one.
  const bsa = bsaMosteller({ heightCm: input.heightCm!, weightKg: input.weightKg })
  let co = input.cardiacOutputLMin
  if (co == null) {
    co = settings.defaultCardiacIndexLMinM2 * bsa
    assumptions.push(
      `Cardiac output ${r1(co)} L/min = resting cardiac index ${settings.defaultCardiacIndexLMinM2} L/min/m² × body surface ` +
        `area ${r2(bsa)} m² (Mosteller); edit it to recompute.`,
    )
  }
  const point = (hbGL: number): OxygenPoint => {
    const cao2 = oxygenContent({ hbGL, so2: input.saO2, po2MmHg: input.paO2MmHg })
    return { hbGL: r1(hbGL), cao2MlDl: r2(cao2), do2MlMin: r0(oxygenDelivery({ cardiacOutputLMin: co!, cao2MlDl: cao2 })) }
  }
  methods.oxygenContent = 'CaO2 = 1.34 × Hb (g/dL) × SaO2 + 0.003 × PaO2 (mmHg)'
  methods.oxygenDelivery = 'DO2 = cardiac output (L/min) × CaO2 × 10'
  assumptions.push(
    `Arterial SaO2 ${Math.round(input.saO2 * 100)} % and PaO2 ${input.paO2MmHg} mmHg are the clinic's stated defaults (no blood ` +
      `gas recorded).`,
  )

  const need = redCellTransfusionNeed({ ebvMl: ebv, hbStartGL: planningHb, hbFloorGL: triggerHbGL, expectedLossMl: lossMl })
  methods.transfusionNeed =
    'Red-cell-volume method (Mercuriali & Inghilleri 1996): units = (expected red-cell loss − tolerated red-cell loss) / 200 mL per unit'
  assumptions.push(HCT_FROM_HB_ASSUMPTION)
  const bloodOrder = decideBloodOrder({
    calculatedUnits: need.units,
    procedure: {
      name: input.procedure.name,
      usualBloodOrder: input.procedure.usualBloodOrder,
      usualUnits: input.procedure.usualUnits,
      transfusionRate: input.procedure.transfusionRate,
    },
    antibodiesPositive: input.antibodiesPositive,
    declinesTransfusion: input.declinesTransfusion,
  })
  methods.bloodOrder =
    'The largest order any rule asks for: red-cell-volume estimate, the catalogue order, the catalogue transfusion rate, a ' +
    'positive antibody screen; a recorded refusal of transfusion overrides all'

  const rule = classifyAnaemia({ hbGL: planningHb, sex: input.sex, criteria: settings.anaemiaCriteria })
  const readiness = readinessVerdict({
    evidence,
    resultMaxAgeDays: settings.resultMaxAgeDays,
    ironStudiesMaxAgeDays: settings.ironStudiesMaxAgeDays,
    thresholdGL: rule.thresholdGL,
    projectedSurgeryHbGL: r1(surgeryHb),
    projectionAssumesRise: assumesRise,
    ironDeficientUntreated: input.ironStatus !== null && isIronDeficient(input.ironStatus) && input.treatment === null,
    allowableLossMl: r0(abl.logarithmic),
    expectedLossMl: lossMl,
    bloodOrder,
    priority: input.priority,
    antibodiesPositive: input.antibodiesPositive,
    declinesTransfusion: input.declinesTransfusion,
  })

  return {
    inputs: {
      ...input,
      cardiacOutputLMin: r2(co),
      triggerHbGL,
      settings: {
        anaemiaCriteria: settings.anaemiaCriteria,
        transfusionTriggerGL: settings.transfusionTriggerGL,
        cardiovascularTriggerGL: settings.cardiovascularTriggerGL,
        resultMaxAgeDays: settings.resultMaxAgeDays,
        ironStudiesMaxAgeDays: settings.ironStudiesMaxAgeDays,
      },
    },
    methods,
    bloodVolumeMl: r0(ebv),
    triggerHbGL,
    currentHbGL: r1(currentHbGL),
    predictedSurgeryHbGL: r1(surgeryHb),
    planningHbGL: r1(planningHb),
    evidence,
    predictedPostOpHbGL: r1(postOpHb),
    allowableBloodLossMl: { gross: r0(abl.gross), logarithmic: r0(abl.logarithmic) },
    expectedBloodLossMl: lossMl,
    oxygen: { today: point(currentHbGL), surgeryDay: point(planningHb), postOp: point(postOpHb) },
    transfusionNeed: {
      toleratedRedCellMl: r0(need.toleratedRedCellMl),
      expectedRedCellLossMl: r0(need.expectedRedCellLossMl),
      deficitMl: r0(need.deficitMl),
      units: need.units,
    },
    bloodOrder,
    readiness,
    assumptions,
    cautions,
  }
}
