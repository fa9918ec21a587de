import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { CreateUserInput, UpdateUserInput } from '@shared/schemas/users'
import { createUser, listUsers, resetUserPassword, updateUser } from '@/api/users'

export const userKeys = {
  all: ['users'] as const,
  list: () => [...userKeys.all, 'list'] as const,
}

export function useUsersQuery() {
  return useQuery({ queryKey: userKeys.list(), queryFn: listUsers })
}

function useInvalidateUsers() {
  const queryClient = useQueryClient()
  return () => queryClient.invalidateQueries({ queryKey: userKeys.all })
}

export function useCreateUserMutation() {
  const invalidate = useInvalidateUsers()
  return useMutation({ mutationFn: (input: CreateUserInput) => createUser(input), onSuccess: invalidate })
}

export function useUpdateUserMutation() {
  const invalidate = useInvalidateUsers()
  return useMutation({
    mutationFn: ({ id, changes }: { id: number; changes: UpdateUserInput }) => updateUser(id, changes),
    onSuccess: invalidate,
  })
}

export function useResetPasswordMutation() {
  const invalidate = useInvalidateUsers()
  return useMutation({ mutationFn: (id: number) => resetUserPassword(id), onSuccess: invalidate })
}
