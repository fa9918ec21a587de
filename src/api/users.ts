import type { Rows, StaffAccount } from '@shared/types'
import type { CreateUserInput, UpdateUserInput } from '@shared/schemas/users'
import type { CreatedUser, TemporaryPassword } from '@shared/users/views'
import { api } from './client'

export async function listUsers(): Promise<StaffAccount[]> {
  const { rows } = await api.get<Rows<StaffAccount>>('/users')
  return rows
}

export function createUser(input: CreateUserInput): Promise<CreatedUser> {
  return api.post<CreatedUser>('/users', input)
}

export function updateUser(id: number, changes: UpdateUserInput): Promise<StaffAccount> {
  return api.patch<StaffAccount>(`/users/${id}`, changes)
}

export function resetUserPassword(id: number): Promise<TemporaryPassword> {
  return api.post<TemporaryPassword>(`/users/${id}/reset-password`)
}
