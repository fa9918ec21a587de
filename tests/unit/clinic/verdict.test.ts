import { describe, expect, it } from 'vitest'
import { buildProjection, type ProjectionInputs } from '../../../shared/clinic/projection'
import { DEFAULT_CLINIC_SETTINGS } from '../../../shared/clinic/settings'

// Verdict scenarios: each rule of "ready needs evidence" with its source beside it.
// Thresholds: surgical anaemia < 130 g/L in both sexes (Muñoz et al., Anaesthesia 2017;72:233);
// result age 90 days (local policy; NBA PBM pre-operative template: 3 months, secondary source);
// re-check ≥ 14 days after the last dose (common practice: a rise takes 10–14 days to show);
// non-response < 10 g/L by 4 weeks after IV iron (common practice).
const TODAY = '2027-03-01'
const woman = { sex: 'female' as const, heightCm: 160, weightKg: 60 }
const hip = {
  code: 'THA',
  name: 'Total hip replacement',
  expectedBloodLossMl: 1510,
  usualBloodOrder: 'group-and-screen',
  usualUnits: 0,
  transfusionRate: 0.1,
}
const base: Omit<ProjectionInputs, 'hbMeasurements'> = {
  today: TODAY,
  timeZone: 'Europe/London',
  plannedSurgeryDate: '2027-05-10',
  ...woman,
  treatment: null,
  procedure: hip,
  priority: 'routine',
  cardiovascularDisease: false,
  ironStatus: 'replete',
  antibodiesPositive: null,
  declinesTransfusion: false,
  saO2: 0.97,
  paO2MmHg: 95,
  cardiacOutputLMin: null,
}
const project = (over: Partial<ProjectionInputs> & Pick<ProjectionInputs, 'hbMeasurements'>, settings = DEFAULT_CLINIC_SETTINGS) =>
  buildProjection({ ...base, ...over }, settings)
const iv = (at: string, totalMg: number, deficitMg: number | null) => ({
  kind: 'iv' as const,
  firstDoseAt: at,
  lastDoseAt: at,
  totalMg,
  deficitMg,
})

describe('"Ready" needs measured evidence', () => {
  it(
    'when a woman with Hb 112 g/L has had one 200 mg IV dose ten weeks before surgery, then she is not ready and a re-check is ' +
      'asked for',
    () => {
      const p = project({
        hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 112 }],
        ironStatus: 'absolute-deficiency',
        // Ganzoni deficit 60 × (150 − 112) × 0.24 + 500 = 1047 mg (reference §6, formula from the SmPCs)
        treatment: iv('2027-02-25T10:00:00Z', 200, 1047),
      })
      expect(p.readiness.verdict).not.toBe('ready')
      expect(p.readiness.verdict).toBe('optimise')
      expect(p.readiness.missing.join(' ')).toMatch(/Needs a re-check after iron/)
      // 200 of 1047 mg is 19 %: the assumed rise is at most 0.19 × 20 = 3.8 g/L, not the full course's 20.
      expect(p.predictedSurgeryHbGL).toBeLessThanOrEqual(112 + 3.83)
    },
  )

  it('when a 60 kg woman with Hb 100 has had one 200 mg dose, then her blood order stays a crossmatch', () => {
    const p = project({
      plannedSurgeryDate: '2027-04-26',
      hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 100 }],
      ironStatus: 'absolute-deficiency',
      treatment: iv('2027-02-22T00:00:00Z', 200, 1220),
    })
    // Red-cell-volume method (Mercuriali & Inghilleri 1996) at the measured 100 g/L: 1 unit (see projection.test.ts)
    expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', units: 1, rule: 'red-cell-volume' })
    expect(p.planningHbGL).toBe(100)
  })

  it('when the only Hb (138 g/L) is 14 months old, then the verdict is "results needed", naming a recent Hb', () => {
    const p = project({ hbMeasurements: [{ takenAt: '2026-01-05T09:00:00Z', hbGL: 138 }] })
    expect(p.readiness.verdict).toBe('results-needed')
    expect(p.readiness.missing[0]).toMatch(
      /^Needs a recent Hb: the latest \(138 g\/L, 2026-01-05\) is 420 days old; results count for 90 days/,
    )
    expect(p.readiness.flags).toContain('result-too-old')
  })

  it('when the clinic sets results to count for 30 days, then a 45-day-old Hb no longer clears the patient', () => {
    const hb = [{ takenAt: '2027-01-15T09:00:00Z', hbGL: 140 }]
    expect(project({ hbMeasurements: hb }).readiness.verdict).toBe('ready')
    expect(project({ hbMeasurements: hb }, { ...DEFAULT_CLINIC_SETTINGS, resultMaxAgeDays: 30 }).readiness.verdict).toBe('results-needed')
  })

  it('when iron status is unresolved (ferritin 50 µg/L, no TSAT or CRP), then the verdict is "results needed", naming TSAT or CRP', () => {
    // Ferritin 30–100 µg/L needs TSAT < 20 % or CRP > 5 mg/L to call deficiency (Muñoz 2017, from memory; reference §5)
    const p = project({ hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 135 }], ironStatus: 'indeterminate' })
    expect(p.readiness.verdict).toBe('results-needed')
    expect(p.readiness.missing).toEqual([expect.stringMatching(/^Needs TSAT or CRP/)])
  })

  it('when no iron studies are recorded, then the verdict is "results needed", naming iron studies', () => {
    const p = project({ hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 135 }], ironStatus: null })
    expect(p.readiness.verdict).toBe('results-needed')
    expect(p.readiness.missing.join(' ')).toMatch(/Needs iron studies/)
  })

  it(
    'when a non-anaemic iron-deficient patient had iron and no re-check yet, then the verdict is "results needed", naming the ' +
      're-check',
    () => {
      const p = project({
        hbMeasurements: [{ takenAt: '2027-02-10T09:00:00Z', hbGL: 134 }],
        ironStatus: 'absolute-deficiency',
        treatment: iv('2027-02-20T10:00:00Z', 500, 500),
      })
      expect(p.readiness.verdict).toBe('results-needed')
      expect(p.readiness.missing).toEqual([expect.stringMatching(/^Needs a re-check after iron/)])
    },
  )

  it('when a re-check 3 weeks after iron measures Hb 132 g/L (from 118), then she is ready', () => {
    const p = project({
      hbMeasurements: [
        { takenAt: '2027-01-20T09:00:00Z', hbGL: 118 },
        { takenAt: '2027-02-26T09:00:00Z', hbGL: 132 },
      ],
      ironStatus: 'absolute-deficiency',
      treatment: iv('2027-02-01T10:00:00Z', 1000, 1000),
    })
    expect(p.evidence.recheck).toMatchObject({ hbGL: 132, date: '2027-02-26' })
    expect(p.readiness.verdict).toBe('ready')
  })
})

describe('response to iron, measured', () => {
  it('when Hb rises only 5 g/L by 5 weeks after 1000 mg IV iron, then "no response to IV iron" is flagged and given as a reason', () => {
    const p = project({
      hbMeasurements: [
        { takenAt: '2027-01-10T09:00:00Z', hbGL: 105 },
        { takenAt: '2027-02-22T09:00:00Z', hbGL: 110 },
      ],
      ironStatus: 'absolute-deficiency',
      treatment: iv('2027-01-15T10:00:00Z', 1000, 1000),
    })
    expect(p.evidence.nonResponse).toBe(true)
    expect(p.readiness.flags).toContain('no-response-to-iron')
    expect(p.readiness.reasons.join(' ')).toMatch(/No response to IV iron: Hb rose less than 10 g\/L/)
    expect(p.readiness.verdict).not.toBe('ready')
  })

  it('when Hb rose 12 g/L by 4 weeks after IV iron, then no non-response is flagged', () => {
    const p = project({
      hbMeasurements: [
        { takenAt: '2027-01-10T09:00:00Z', hbGL: 105 },
        { takenAt: '2027-02-20T09:00:00Z', hbGL: 117 },
      ],
      ironStatus: 'absolute-deficiency',
      treatment: iv('2027-01-15T10:00:00Z', 1000, 1000),
    })
    expect(p.evidence.nonResponse).toBe(false)
  })

  it(
    'when Hb falls from 124 to 112 g/L after iron, then the projection goes below the lowest value and the routine verdict ' +
      'escalates to deferral',
    () => {
      const p = project({
        hbMeasurements: [
          { takenAt: '2027-01-10T09:00:00Z', hbGL: 124 },
          { takenAt: '2027-02-25T09:00:00Z', hbGL: 112 },
        ],
        ironStatus: 'absolute-deficiency',
        treatment: iv('2027-01-15T10:00:00Z', 1000, 1000),
      })
      expect(p.readiness.flags).toContain('hb-falling')
      expect(p.predictedSurgeryHbGL).toBeLessThan(112)
      expect(p.readiness.verdict).toBe('consider-deferral')
      expect(p.readiness.reasons.join(' ')).toMatch(/Hb is falling after iron/)
    },
  )

  it('when Hb falls after iron on the cancer pathway, then the verdict is to optimise and find the cause, not defer', () => {
    const p = project({
      priority: 'cancer',
      hbMeasurements: [
        { takenAt: '2027-01-10T09:00:00Z', hbGL: 124 },
        { takenAt: '2027-02-25T09:00:00Z', hbGL: 112 },
      ],
      ironStatus: 'absolute-deficiency',
      treatment: iv('2027-01-15T10:00:00Z', 1000, 1000),
    })
    expect(p.readiness.verdict).toBe('optimise')
    expect(p.readiness.reasons.join(' ')).toMatch(/find the cause of the fall/)
  })
})

describe('the blood order and its deciding rule', () => {
  const fit = { hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 140 }] }

  it('when a fit patient has a knee replacement, then group and screen is decided by no rule asking for units', () => {
    const p = project({ ...fit, procedure: { ...hip, transfusionRate: 0.08 } })
    expect(p.bloodOrder).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'group-and-screen' })
  })

  it(
    'when 35 % of patients having the operation are transfused, then the catalogue rate decides a crossmatch (T% ≥ 30 %, from ' +
      'memory; local policy)',
    () => {
      const p = project({ ...fit, procedure: { ...hip, transfusionRate: 0.35 } })
      expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', units: 1, rule: 'catalogue-rate' })
    },
  )

  it('when the antibody screen is positive, then crossmatch is forced and the laboratory lead time is flagged (common practice)', () => {
    const p = project({ ...fit, antibodiesPositive: true })
    expect(p.bloodOrder).toMatchObject({ kind: 'crossmatch', rule: 'antibodies' })
    expect(p.bloodOrder.notes.join(' ')).toMatch(/antigen-negative units can take hours to days/)
    expect(p.readiness.flags).toContain('red-cell-antibodies')
  })

  it(
    'when the patient declines transfusion, then no units are crossmatched and the plan prompts cell salvage, tranexamic acid and a ' +
      'higher target',
    () => {
      const p = project({
        ...fit,
        hbMeasurements: [{ takenAt: '2027-02-20T09:00:00Z', hbGL: 135 }],
        declinesTransfusion: true,
        antibodiesPositive: true,
      })
      expect(p.bloodOrder).toMatchObject({ kind: 'group-and-screen', units: 0, rule: 'declines-transfusion' })
      // Target 130 + 10 g/L (local policy): 135 g/L is below it, so she is still to optimise.
      expect(p.readiness.targetHbGL).toBe(140)
      expect(p.readiness.verdict).toBe('optimise')
      const plan = p.readiness.plan.join(' ')
      expect(plan).toMatch(/Cell salvage/)
      // NICE NG24 (2015) and QS138 statement 2 (checked with the search tool): TXA when expected loss > 500 mL
      expect(plan).toMatch(/Tranexamic acid.*NICE NG24.*500 mL/)
      expect(p.readiness.flags).toContain('declines-transfusion')
    },
  )
})

describe('the surgery day on the clinic calendar', () => {
  it('when today is the surgery day and an Hb was taken at 07:30 that morning, then the verdict uses it', () => {
    const p = project({
      today: '2027-07-14',
      plannedSurgeryDate: '2027-07-14',
      hbMeasurements: [
        { takenAt: '2027-06-20T09:00:00Z', hbGL: 122 },
        { takenAt: '2027-07-14T06:30:00Z', hbGL: 131 },
      ],
    })
    expect(p.currentHbGL).toBe(131)
    expect(p.readiness.verdict).toBe('ready')
  })
})
