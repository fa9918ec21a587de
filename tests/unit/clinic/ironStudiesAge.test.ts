import { describe, expect, it } from 'vitest'
import { recentIronStatus } from '../../../shared/clinic/ironStudies'
import { buildProjection, type ProjectionInputs } from '../../../shared/clinic/projection'
import { DEFAULT_CLINIC_SETTINGS } from '../../../shared/clinic/settings'

// Iron status cut-offs: ferritin < 30 µg/L absolute deficiency; ferritin < 100 with TSAT < 20 %
// or CRP > 5 mg/L deficiency with inflammation (Muñoz et al., Anaesthesia 2017;72:233, from
// memory, clinical reference §5). Age limit: 90 days by default (local policy; the Australian NBA
// pre-operative template asks for results no older than 3 months, secondary source, §11).
const TODAY = '2027-03-01'
const ZONE = 'Europe/London'
const recentDay = '2027-02-20T09:00:00Z'
const oldDay = '2026-10-01T09:00:00Z' // 151 days before TODAY

describe('iron studies must be recent to settle the iron status', () => {
  it('when ferritin 200 µg/L and TSAT 25 % were taken 10 days ago, then iron status is replete', () => {
    const r = recentIronStatus({ ferritin: { value: 200, takenAt: recentDay }, tsat: { value: 25, takenAt: recentDay } }, TODAY, ZONE, 90)
    expect(r).toEqual({ status: 'replete', tooOld: [], need: 'ok' })
  })

  it('when the only ferritin and TSAT are 151 days old, then iron status is unresolved and recent iron studies are asked for', () => {
    const r = recentIronStatus({ ferritin: { value: 200, takenAt: oldDay }, tsat: { value: 25, takenAt: oldDay } }, TODAY, ZONE, 90)
    expect(r.status).toBeNull()
    expect(r.need).toBe('recent-iron-studies')
    expect(r.tooOld.map((o) => [o.analyte, o.date, o.ageDays])).toEqual([
      ['ferritin', '2026-10-01', 151],
      ['tsat', '2026-10-01', 151],
    ])
  })

  it(
    'when ferritin is recent but the TSAT that settled it is old, then the ' + 'status is indeterminate and recent studies are asked for',
    () => {
      const r = recentIronStatus({ ferritin: { value: 60, takenAt: recentDay }, tsat: { value: 25, takenAt: oldDay } }, TODAY, ZONE, 90)
      expect(r.status).toBe('indeterminate')
      expect(r.need).toBe('recent-iron-studies')
    },
  )

  it('when ferritin is 90 days old on the clinic calendar, then it still counts; at 91 days it does not', () => {
    // 2026-12-01 is 90 days before 2027-03-01. 23:30 UTC on 30 Nov is already 1 Dec in Auckland.
    expect(recentIronStatus({ ferritin: { value: 20, takenAt: '2026-12-01T09:00:00Z' } }, TODAY, ZONE, 90).need).toBe('ok')
    expect(recentIronStatus({ ferritin: { value: 20, takenAt: '2026-11-30T09:00:00Z' } }, TODAY, ZONE, 90).need).toBe('recent-iron-studies')
    expect(recentIronStatus({ ferritin: { value: 20, takenAt: '2026-11-30T23:30:00Z' } }, TODAY, 'Pacific/Auckland', 90).need).toBe('ok')
  })

  it('when no ferritin was ever taken, then iron studies are asked for', () => {
    expect(recentIronStatus({ crp: { value: 3, takenAt: recentDay } }, TODAY, ZONE, 90).need).toBe('iron-studies')
  })
})

describe('the verdict on old iron studies', () => {
  const base: ProjectionInputs = {
    today: TODAY,
    timeZone: ZONE,
    plannedSurgeryDate: '2027-05-10',
    sex: 'male',
    heightCm: 175,
    weightKg: 70,
    hbMeasurements: [{ takenAt: recentDay, hbGL: 145 }],
    treatment: null,
    procedure: {
      code: 'THA',
      name: 'Total hip replacement',
      expectedBloodLossMl: 1510,
      usualBloodOrder: 'group-and-screen',
      usualUnits: 0,
      transfusionRate: 0.1,
    },
    priority: 'routine',
    cardiovascularDisease: false,
    ironStatus: 'replete',
    antibodiesPositive: null,
    declinesTransfusion: false,
    saO2: 0.97,
    paO2MmHg: 95,
    cardiacOutputLMin: null,
  }

  it(
    'when a man with a recent Hb of 145 g/L has replete iron studies 151 days old, then he is not ready: the verdict names recent ' +
      'iron studies',
    () => {
      const p = buildProjection(
        { ...base, ironStudies: { ferritin: { value: 200, takenAt: oldDay }, tsat: { value: 25, takenAt: oldDay } } },
        DEFAULT_CLINIC_SETTINGS,
      )
      expect(p.readiness.verdict).toBe('results-needed')
      expect(p.readiness.missing).toEqual([
        'Needs recent iron studies: ferritin of 2026-10-01 (151 days old), TSAT of 2026-10-01 (151 days old); iron studies count ' +
          'for 90 days (local policy), so the iron status is unresolved.',
      ])
      expect(p.readiness.flags).toContain('iron-studies-too-old')
      expect(p.evidence.ironKnown).toBe(false)
    },
  )

  it('when the same studies were taken 10 days ago, then he is ready', () => {
    const p = buildProjection(
      { ...base, ironStudies: { ferritin: { value: 200, takenAt: recentDay }, tsat: { value: 25, takenAt: recentDay } } },
      DEFAULT_CLINIC_SETTINGS,
    )
    expect(p.readiness.verdict).toBe('ready')
  })

  it('when the clinic sets iron studies to count for 180 days, then the 151-day-old studies count again', () => {
    const p = buildProjection(
      { ...base, ironStudies: { ferritin: { value: 200, takenAt: oldDay }, tsat: { value: 25, takenAt: oldDay } } },
      { ...DEFAULT_CLINIC_SETTINGS, ironStudiesMaxAgeDays: 180 },
    )
    expect(p.readiness.verdict).toBe('ready')
  })
})
