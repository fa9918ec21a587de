/**
 * The service's quality measures: one numerator and one denominator definition each, the
 * published source it is counted for, and the national audit figure where there is one.
 * Statement wording checked against nice.org.uk/guidance/qs138 (quality statements page);
 * audit figures against the NHS Blood and Transplant audit pages named in each benchmark.
 */

export const QUALITY_MEASURE_IDS = [
  'iron-before-surgery',
  'post-operative-iron',
  'tranexamic-acid',
  'reassessed-after-each-unit',
  'transfusion-information',
  'screened-28-days-before',
  'screened-in-window-14-45',
  'anaemic-on-day-of-surgery',
  'transfused',
  'single-unit-red-cell-transfusions',
  'postponed-for-anaemia',
  'cancelled-for-anaemia',
  'crossmatch-against-schedule',
] as const
export type QualityMeasureId = (typeof QUALITY_MEASURE_IDS)[number]

/** Figures that are not a share of a denominator (a median, a rate per 100). */
export const QUALITY_FIGURE_IDS = ['median-pre-transfusion-hb', 'units-per-100-operated'] as const
export type QualityFigureId = (typeof QUALITY_FIGURE_IDS)[number]

export interface Benchmark {
  percent: number
  label: string
  source: string
}
export interface MeasureDefinition {
  title: string
  numerator: string
  denominator: string
  source: string
  benchmark?: Benchmark
}

/** The expected blood loss that makes tranexamic acid due (QS138 statement 2, "moderate blood loss"). */
export const TXA_EXPECTED_LOSS_ML = 500

const QS138 = 'NICE quality standard QS138 (blood transfusion, 2016)'
const NCA_2023 = 'NHS Blood and Transplant, 2023 National Comparative Audit of NICE Quality Standard QS138 (published March 2024)'
const NCA_2021 = 'NHS Blood and Transplant, 2021 National Comparative Audit of NICE Quality Standard QS138'
const WA_2017 = 'Leahy et al., Transfusion 2017;57:1347–58 (Western Australia PBM programme outcomes)'
const OPERATED = 'Episodes with a post-operative record whose surgery date is in the period'
const IDA =
  `${OPERATED} with iron-deficiency anaemia at screening: first Hb below the clinic's anaemia threshold for the patient's sex, ` +
  `and iron status absolute deficiency or iron-restricted (or iron prescribed)`
const RBC = 'Red-cell transfusions (standing, not voided) given to those episodes'
const MSBOS_2013 =
  'Frank et al., Anesthesiology 2013;118(6):1286 (optimising preoperative blood ordering with a maximum surgical blood order schedule)'

export const MEASURES: Record<QualityMeasureId, MeasureDefinition> = {
  'iron-before-surgery': {
    title: 'Iron before surgery for iron-deficiency anaemia',
    numerator: 'Of the denominator, episodes with at least one iron dose recorded as given on or before the surgery date',
    denominator: IDA,
    source:
      `${QS138}, statement 1: "People with iron-deficiency anaemia who are having surgery are offered iron supplementation before ` +
      `and after surgery."`,
    benchmark: { percent: 68, label: '617 of 908 patients (68 %)', source: NCA_2023 },
  },
  'post-operative-iron': {
    title: 'Iron after surgery for iron-deficiency anaemia',
    numerator: 'Of the denominator, episodes whose operative record says iron was given after surgery',
    denominator: IDA,
    source: `${QS138}, statement 1 (the "after surgery" half)`,
  },
  'tranexamic-acid': {
    title: 'Tranexamic acid when moderate blood loss is expected',
    numerator: 'Of the denominator, episodes whose operative record says tranexamic acid was given',
    denominator: `${OPERATED} whose operation's expected blood loss in the catalogue is ${TXA_EXPECTED_LOSS_ML} mL or more`,
    source:
      `${QS138}, statement 2: "Adults who are having surgery and are expected to have moderate blood loss are offered tranexamic ` +
      `acid." (NICE's plain-language text: more than half a litre; counted here from ${TXA_EXPECTED_LOSS_ML} mL as the service's ` +
      `brief sets it)`,
    benchmark: { percent: 67.5, label: '900 of 1335 patients (67.5 %)', source: NCA_2023 },
  },
  'reassessed-after-each-unit': {
    title: 'Reassessed, with an Hb, after each red-cell unit',
    numerator:
      'Of the denominator, single-unit transfusions after which the patient was clinically reassessed and an Hb was checked ' +
      'before anything more was given',
    denominator: `${RBC}. Ferrolane does not record active bleeding or a chronic transfusion programme, so none is excluded`,
    source:
      `${QS138}, statement 3: "People are clinically reassessed and have their haemoglobin levels checked after each unit of red ` +
      `blood cells they receive, unless they are bleeding or are on a chronic transfusion programme."`,
    benchmark: { percent: 63.6, label: '766 of 1205 patients (63.6 %), elective red-cell transfusions', source: NCA_2023 },
  },
  'transfusion-information': {
    title: 'Given information about transfusion',
    numerator: 'Of the denominator, episodes where information was recorded as given (on a transfusion or on the operative record)',
    denominator: `${OPERATED} that had a transfusion of any component`,
    source:
      `${QS138}, statement 4: "People who may need or who have had a blood transfusion are given verbal and written information ` +
      `about blood transfusion."`,
    benchmark: { percent: 64, label: '1032 of 1622 transfused patients (64 %)', source: NCA_2021 },
  },
  'screened-28-days-before': {
    title: 'Screened at least 28 days before surgery',
    numerator: 'Of the denominator, episodes whose first Hb was taken 28 or more days before the surgery date',
    denominator: OPERATED,
    // Checked with the search tool against the PubMed abstract of Goodnough et al. 2011 (PMID 21148637).
    source:
      'NATA guidelines (Goodnough et al., Br J Anaesth 2011;106:13–22): an Hb 28 days before scheduled elective orthopaedic ' +
      'surgery where possible (grade 1C); applied to every operation here by local policy',
  },
  'screened-in-window-14-45': {
    title: 'Anaemia screening 14–45 days before surgery',
    numerator: 'Of the denominator, episodes with an Hb taken 14 to 45 days (inclusive) before the surgery date',
    denominator: OPERATED,
    source:
      'The Joint Commission blood management performance measures (manual 2010B), BM-06 "Preoperative Anemia Screening": ' +
      'screening 14–45 days before anaesthesia start',
  },
  'anaemic-on-day-of-surgery': {
    title: 'Anaemic on the day of surgery',
    numerator:
      "Of the denominator, episodes whose last Hb on or before the surgery date is below the clinic's anaemia threshold for the " +
      "patient's sex",
    denominator: `${OPERATED} with an Hb on or before the surgery date`,
    source: `${WA_2017}: elective surgery patients anaemic at admission`,
  },
  transfused: {
    title: 'Given red cells',
    numerator: 'Of the denominator, episodes given at least one red-cell unit (from the transfusion record)',
    denominator: OPERATED,
    source: `${QS138}, outcome measure of statements 1 and 2: blood transfusion rates associated with surgery`,
  },
  'single-unit-red-cell-transfusions': {
    title: 'Single-unit red-cell transfusions',
    numerator: 'Of the denominator, transfusions of exactly one red-cell unit',
    denominator: RBC,
    source: `${WA_2017}: single-unit red-cell transfusions`,
  },
  'postponed-for-anaemia': {
    title: 'Surgery postponed or cancelled for anaemia before it went ahead',
    numerator:
      'Of the denominator, episodes whose planned surgery date was moved with the reason "Postponed for anaemia", or whose ' +
      'planned operation was cancelled with the reason "Cancelled for anaemia", at least once before the operation',
    denominator: OPERATED,
    source: 'Local policy: postponements and cancellations for anaemia are counted so their cost in waiting time is seen',
  },
  'cancelled-for-anaemia': {
    title: 'Planned operations cancelled for anaemia',
    numerator: 'Of the denominator, cancellations recorded with the reason "Cancelled for anaemia"',
    denominator:
      'Planned operations whose day fell in the period and that either went ahead (a post-operative record with its surgery ' +
      'date in the period) or were cancelled (a recorded cancellation of a planned date in the period). An episode cancelled ' +
      'and later operated counts once for each',
    source: 'Local policy: the service counts operations lost to anaemia, the harm pre-operative anaemia treatment is meant to prevent',
  },
  'crossmatch-against-schedule': {
    title: 'Crossmatched although the schedule asks for group and screen (lower is better)',
    numerator: 'Of the denominator, episodes whose post-operative record shows one or more units crossmatched',
    denominator:
      `${OPERATED} whose operation's usual blood order in the catalogue (the service's surgical blood order schedule) is group ` +
      `and screen, leaving out patients with red-cell antibodies recorded on the episode (they need crossmatched blood whatever ` +
      `the schedule says)`,
    source:
      `${MSBOS_2013}: type and screen versus crossmatch against the schedule; before the schedule was updated, 1,509 of 4,644 ` +
      `cases (32.5 %) that needed only a type and screen had a crossmatch ordered`,
  },
}

export const FIGURES: Record<QualityFigureId, MeasureDefinition & { unit: string }> = {
  'median-pre-transfusion-hb': {
    title: 'Median pre-transfusion Hb',
    unit: 'g/L',
    numerator: 'Median of the pre-transfusion Hb of the red-cell transfusions in the denominator',
    denominator: `${RBC} with a pre-transfusion Hb`,
    source: `${WA_2017}: pre-transfusion haemoglobin; thresholds from AABB 2023 (Carson et al., JAMA 2023)`,
  },
  'units-per-100-operated': {
    title: 'Red-cell units per 100 operated patients',
    unit: 'units per 100',
    numerator: 'Red-cell units transfused (standing rows) × 100',
    denominator: OPERATED,
    source: `${WA_2017}: red-cell units per admission (here per 100 operated episodes)`,
  },
}

export interface MeasureFigure {
  numerator: number
  denominator: number
  percent: number | null
}

export interface QualityMeasure extends MeasureFigure {
  id: QualityMeasureId | QualityFigureId
  title: string
  /** For a median or a rate: the figure itself; for a share, null (see percent). */
  value: number | null
  unit: string | null
  definition: { numerator: string; denominator: string; period: string }
  source: string
  benchmark?: Benchmark
}

export interface QualityBreakdownRow {
  key: string
  name: string
  measures: Record<QualityMeasureId, MeasureFigure>
}

/** GET /api/reports/quality */
export interface QualityReport {
  period: { from: string; to: string; basis: string }
  filters: { surgeonId: number | null; procedureCode: string | null }
  measures: QualityMeasure[]
  byOperation: QualityBreakdownRow[]
  bySurgeon: QualityBreakdownRow[]
  trend: { month: string; measures: Record<QualityMeasureId, MeasureFigure> }[]
  caution: string
}
