import type { FollowUpInput, OutcomeInput } from '@shared/schemas/outcomes'
import type { FollowUpRecorded, OutcomeRead } from '@shared/outcomes/views'
import { api } from './client'

const base = (id: number) => `/referrals/${id}`

export function getOutcome(id: number): Promise<OutcomeRead> {
  return api.get<OutcomeRead>(`${base(id)}/outcome`)
}

export function recordOutcome(id: number, input: OutcomeInput): Promise<OutcomeRead> {
  return api.post<OutcomeRead>(`${base(id)}/outcome`, input)
}

export function recordFollowUp(id: number, input: FollowUpInput): Promise<FollowUpRecorded> {
  return api.post(`${base(id)}/follow-up`, input)
}
