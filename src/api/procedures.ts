import { api } from './client'
import type { Procedure } from './pathwayTypes'

/** The operations catalogue (active operations only). */
export async function listProcedures(): Promise<Procedure[]> {
  const { rows } = await api.get<{ rows: Procedure[] }>('/procedures')
  return rows
}
