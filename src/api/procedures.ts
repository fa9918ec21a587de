import { api } from './client'
import type { Rows } from '@shared/types'
import type { ProcedureView } from '@shared/pathway/views'

/** The operations catalogue (active operations only). */
export async function listProcedures(): Promise<ProcedureView[]> {
  const { rows } = await api.get<Rows<ProcedureView>>('/procedures')
  return rows
}
