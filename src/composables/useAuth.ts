import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import type { ChangePasswordInput, LoginInput } from '@shared/schemas/auth'
import { changePassword, fetchMe, fetchProviders, login, logout } from '@/api/auth'
import { useSessionStore } from '@/stores/session'

export const authKeys = {
  all: ['auth'] as const,
  me: () => [...authKeys.all, 'me'] as const,
  providers: () => [...authKeys.all, 'providers'] as const,
}

/** The ways to sign in (directory and/or local form); fixed by the server's configuration. */
export function useProvidersQuery() {
  return useQuery({ queryKey: authKeys.providers(), queryFn: fetchProviders, staleTime: Infinity })
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
    // A directory session is ended at the provider too, which then sends the browser back to
    // sign-in. Done here, not in the caller, because the caller unmounts once the session clears.
    onSuccess: (endSessionUrl) => {
      if (endSessionUrl) window.location.assign(endSessionUrl)
    },
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
