import type { TransfusionList, TransfusionWrite } from '@shared/transfusion/views'
import { api } from './client'

/** The transfusion as sent: givenAt as an ISO string. */
export interface TransfusionPayload {
  givenAt: string
  phase?: string
  component: string
  units: number
  preTransfusionHbGL: number | null
  reassessedBeforeNext: boolean
  postTransfusionHbGL: number | null
  informationGiven: boolean
  productCodes: string[]
  reason: string | null
}

const base = (id: number) => `/referrals/${id}/transfusions`

export function listTransfusions(id: number): Promise<TransfusionList> {
  return api.get<TransfusionList>(base(id))
}

export function recordTransfusion(id: number, input: TransfusionPayload): Promise<TransfusionWrite> {
  return api.post<TransfusionWrite>(base(id), input)
}

export function voidTransfusion(id: number, transfusionId: number, reason: string): Promise<TransfusionWrite> {
  return api.post<TransfusionWrite>(`${base(id)}/${transfusionId}/void`, { reason })
}

export function editTransfusion(
  id: number,
  transfusionId: number,
  input: TransfusionPayload & { changeReason: string },
): Promise<TransfusionWrite> {
  return api.put<TransfusionWrite>(`${base(id)}/${transfusionId}`, input)
}
