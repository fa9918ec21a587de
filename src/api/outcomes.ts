import type { Complication, FollowUpInput, OutcomeInput, TXA_TIMINGS } from '@shared/schemas/outcomes'

type TxaTiming = (typeof TXA_TIMINGS)[number]
import type { OutcomeWarning } from '@shared/reports/outcomeWarnings'
import { api } from './client'

export interface FollowUpView { recheckHbGL: number | null; recheckDate: string | null; ironAfterSurgery: boolean | null; notes: string | null; recordedAt: string | null }
export interface OutcomeView {
  id: number; referralId: number; surgeryDate: string; bloodLossMl: number; unitsTransfusedIntraOp: number; unitsTransfusedPostOp: number
  unitsCrossmatched: number; lowestHbGL: number; dischargeHbGL: number | null; lengthOfStayDays: number; complications: Complication[]
  tranexamicAcidGiven: boolean | null; tranexamicAcidDoseMg: number | null; tranexamicAcidTiming: TxaTiming | null
  cellSalvageUsed: boolean | null; cellSalvageReturnedMl: number | null
  transfusionInformationGiven: boolean | null; transfusionConsent: boolean | null; postOperativeIronGiven: boolean | null
  followUp: FollowUpView | null
}
export interface OutcomeRead { outcome: OutcomeView; warnings: OutcomeWarning[]; version: number }

const base = (id: number) => `/referrals/${id}`

export function getOutcome(id: number): Promise<OutcomeRead> {
  return api.get<OutcomeRead>(`${base(id)}/outcome`)
}

export function recordOutcome(id: number, input: OutcomeInput): Promise<OutcomeRead> {
  return api.post<OutcomeRead>(`${base(id)}/outcome`, input)
}

export function recordFollowUp(id: number, input: FollowUpInput): Promise<{ outcome: OutcomeView; version: number }> {
  return api.post(`${base(id)}/follow-up`, input)
}
