import { useMutation, useQuery, useQueryClient } from '@tanstack/vue-query'
import { useRouter } from 'vue-router'
import type { ChangePasswordInput, LoginInput } from '@shared/schemas/auth'
import {
  changePassword,
  confirmSecondFactorEnrolment,
  fetchProviders,
  fetchSecondFactorStatus,
  login,
  loginSecondFactor,
  logout,
  startSecondFactorEnrolment,
  type SignInStep,
} from '@/api/auth'
import { useSessionStore } from '@/stores/session'

// The signed-in user is not cached here: it lives in the session store (Pinia) alone, set by the
// router's first check and by sign-in, so no copy in the query cache has to be kept in step.
export const authKeys = {
  all: ['auth'] as const,
  providers: () => [...authKeys.all, 'providers'] as const,
}

/** The ways to sign in (directory and/or local form); fixed by the server's configuration. */
export function useProvidersQuery() {
  return useQuery({ queryKey: authKeys.providers(), queryFn: fetchProviders, staleTime: Infinity })
}

function useSignInStep<T>(step: (input: T) => Promise<SignInStep>) {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  return useMutation({
    mutationFn: step,
    onSuccess: (result) => {
      if (result === 'second-factor') return
      // Data cached under someone else's session must not leak into this one.
      queryClient.removeQueries()
      session.setUser(result)
    },
  })
}

export function useLoginMutation() {
  return useSignInStep((input: LoginInput) => login(input))
}

export function useSecondFactorSignInMutation() {
  return useSignInStep((code: string) => loginSecondFactor(code))
}

export function useSecondFactorStatusQuery() {
  return useQuery({ queryKey: [...authKeys.all, 'second-factor'], queryFn: fetchSecondFactorStatus })
}

export function useStartEnrolmentMutation() {
  return useMutation({ mutationFn: startSecondFactorEnrolment })
}

export function useConfirmEnrolmentMutation() {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  return useMutation({
    mutationFn: (code: string) => confirmSecondFactorEnrolment(code),
    onSuccess: () => {
      session.markSecondFactorEnrolled()
      return queryClient.invalidateQueries({ queryKey: authKeys.all })
    },
  })
}

export function useLogoutMutation() {
  const queryClient = useQueryClient()
  const session = useSessionStore()
  const router = useRouter()
  return useMutation({
    mutationFn: logout,
    // Sign out locally even if the server call fails: the person asked to leave. A directory
    // session is ended at the provider too, which then sends the browser back to sign-in. Done
    // here, not in the caller's mutate(), because the caller unmounts once the session clears.
    onSettled: (endSessionUrl) => {
      session.clear()
      queryClient.removeQueries()
      if (endSessionUrl) window.location.assign(endSessionUrl)
      else void router.push({ name: 'sign-in' })
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
