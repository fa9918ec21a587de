import type { StaffAccount } from '@shared/types'
import type { CreateUserInput, UpdateUserInput } from '@shared/schemas/users'
import { api } from './client'

export async function listUsers(): Promise<StaffAccount[]> {
  const { rows } = await api.get<{ rows: StaffAccount[] }>('/users')
  return rows
}

export interface CreatedUser {
  user: StaffAccount
  temporaryPassword: string
}

export function createUser(input: CreateUserInput): Promise<CreatedUser> {
  return api.post<CreatedUser>('/users', input)
}

export function updateUser(id: number, changes: UpdateUserInput): Promise<StaffAccount> {
  return api.patch<StaffAccount>(`/users/${id}`, changes)
}

export function resetUserPassword(id: number): Promise<{ temporaryPassword: string }> {
  return api.post<{ temporaryPassword: string }>(`/users/${id}/reset-password`)
}
