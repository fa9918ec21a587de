// @vitest-environment jsdom
import { afterEach, describe, expect, it, vi } from 'vitest'
import { buildProjection } from '@shared/clinic/projection'
import { DEFAULT_CLINIC_SETTINGS } from '@shared/clinic/settings'
import { DECISION_SUPPORT_CAUTION, VERDICT_LABELS } from '@shared/clinic/readiness'
import type { ReferralDetail } from '@shared/pathway/views'
import { answerFetch, mountInApp } from '@/testing/component'
import EpisodeReadinessPanel from './EpisodeReadinessPanel.vue'

afterEach(() => vi.unstubAllGlobals())

// Only the fields the panel and its parts read; an invented demo episode.
const episode = {
  id: 7,
  surgeonId: 3,
  surgeon: { id: 3, name: 'Demo Surgeon' },
  readOnly: false,
  version: 1,
  stage: 'clinic',
  redCellAntibodies: false,
  declinesTransfusion: false,
  plannedSurgeryDate: '2026-06-15',
  screening: { thresholdGL: 130 },
} as unknown as ReferralDetail

/** The server's answer, from the shared projection rules with the clinic's default settings. */
function projection(hbGL: number) {
  return buildProjection(
    {
      today: '2026-05-01',
      timeZone: 'Europe/London',
      plannedSurgeryDate: '2026-06-15',
      sex: 'female',
      heightCm: 165,
      weightKg: 70,
      hbMeasurements: [{ takenAt: '2026-04-28T09:00:00Z', hbGL }],
      treatment: null,
      procedure: {
        code: 'demo-hip',
        name: 'Demo hip replacement',
        expectedBloodLossMl: 1000,
        usualBloodOrder: 'group-and-screen',
        usualUnits: 0,
        transfusionRate: null,
      },
      priority: 'routine',
      cardiovascularDisease: false,
      ironStatus: null,
      antibodiesPositive: false,
      declinesTransfusion: false,
      saO2: DEFAULT_CLINIC_SETTINGS.defaultSaO2,
      paO2MmHg: DEFAULT_CLINIC_SETTINGS.defaultPaO2MmHg,
      cardiacOutputLMin: null,
    },
    DEFAULT_CLINIC_SETTINGS,
  )
}

describe('the readiness panel', () => {
  it('when the server projects the surgery day, then the verdict is a word and the decision-support caution is shown', async () => {
    const p = projection(95)
    answerFetch({
      'GET /referrals/7/projection': { status: 200, body: p },
      'GET /referrals/7/readiness': { status: 200, body: { rows: [] } },
    })
    const wrapper = mountInApp(EpisodeReadinessPanel, { props: { episode } })
    await vi.waitFor(() => expect(wrapper.find('[data-testid="readiness-verdict"]').exists()).toBe(true))
    expect(p.readiness.verdict).not.toBeNull()
    expect(wrapper.get('[data-testid="readiness-verdict"]').text()).toBe(VERDICT_LABELS[p.readiness.verdict!])
    expect(wrapper.get('[data-testid="readiness-assumptions"]').text()).toContain(DECISION_SUPPORT_CAUTION)
    wrapper.unmount()
  })

  it('when the server cannot project (422), then each missing input is named with what to do, and no verdict is shown', async () => {
    answerFetch({
      'GET /referrals/7/projection': {
        status: 422,
        body: { error: { code: 'projection_inputs_missing', message: 'Cannot project the surgery day', fields: { weightKg: 'weight' } } },
      },
      'GET /referrals/7/readiness': { status: 200, body: { rows: [] } },
    })
    const wrapper = mountInApp(EpisodeReadinessPanel, { props: { episode } })
    await vi.waitFor(() => expect(wrapper.find('[data-testid="projection-missing"]').exists()).toBe(true))
    const missing = wrapper.get('[data-testid="projection-missing"]').text()
    expect(missing).toContain('Cannot project the surgery day.')
    expect(missing).toContain("Missing: weight. Record the patient's weight")
    expect(wrapper.find('[data-testid="readiness-verdict"]').exists()).toBe(false)
    wrapper.unmount()
  })
})
