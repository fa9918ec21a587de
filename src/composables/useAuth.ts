import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { ChangePasswordInput, LoginInput } from '@shared/schemas/auth'
import { changePassword, fetchMe, login, logout } from '@/api/auth'
import { useSessionStore } from '@/stores/session'

export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
}

/** Shared by the router guard (fetchQuery) and components (useQuery). */
export const meQueryOptions = () => ({ queryKey: authKeys.me(), queryFn: fetchMe })

export function useMeQuery() {
  return useQuery(meQueryOptions())
}

export function useLoginMutation() {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  return useMutation({
    mutationFn: (input: LoginInput) => login(input),
    onSuccess: (user) => {
      // Data cached under someone else's session must not leak into this one.
      queryClient.removeQueries()
      queryClient.setQueryData(authKeys.me(), user)
      session.setUser(user)
    },
  })
}

export function useLogoutMutation() {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  return useMutation({
    mutationFn: logout,
    // Sign out locally even if the server call fails: the person asked to leave.
    onSettled: () => {
      session.clear()
      queryClient.removeQueries()
    },
  })
}

export function useChangePasswordMutation() {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  return useMutation({
    mutationFn: (input: ChangePasswordInput) => changePassword(input),
    onSuccess: () => {
      session.markPasswordChanged()
      return queryClient.invalidateQueries({ queryKey: authKeys.all })
    },
  })
}
