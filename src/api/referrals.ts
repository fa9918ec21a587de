import type { CreateReferralInput, TransitionInput, UpdateReferralInput } from '@shared/schemas/referrals'
import type { CreateResultInput } from '@shared/schemas/results'
import type { CancelOperationInput } from '@shared/schemas/cancellations'
import { api } from './client'
import type { AddedResult, EpisodeUpdates, ReferralDetail } from '@shared/pathway/views'

/** The open episode's one poll: always a re-read of what the screen shows (audited as a refetch). */
export function getEpisodeUpdates(id: number, previous?: EpisodeUpdates): Promise<EpisodeUpdates> {
  return api.poll<EpisodeUpdates>(`/referrals/${id}/updates`, previous, { refetch: true })
}

/** `refetch`: the episode is already on screen (a poll); opening it is audited every time, polls are not. */
export function getReferral(id: number, opts: { refetch?: boolean; previous?: ReferralDetail } = {}): Promise<ReferralDetail> {
  // Conditional on the copy on screen: a poll that finds nothing new is a 304 with no body.
  return api.poll<ReferralDetail>(`/referrals/${id}`, opts.previous, { refetch: opts.refetch })
}

export function createReferral(input: CreateReferralInput): Promise<ReferralDetail> {
  return api.post<ReferralDetail>('/referrals', input)
}

export function updateReferral(id: number, input: UpdateReferralInput): Promise<ReferralDetail> {
  return api.patch<ReferralDetail>(`/referrals/${id}`, input)
}

export function cancelPlannedOperation(id: number, input: CancelOperationInput): Promise<ReferralDetail> {
  return api.post<ReferralDetail>(`/referrals/${id}/cancellation`, input)
}

export function moveReferral(id: number, input: TransitionInput): Promise<ReferralDetail> {
  return api.post<ReferralDetail>(`/referrals/${id}/transitions`, input)
}

export function addResult(id: number, input: CreateResultInput): Promise<AddedResult> {
  return api.post<AddedResult>(`/referrals/${id}/results`, input)
}
