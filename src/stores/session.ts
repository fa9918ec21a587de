import { computed, ref } from 'vue'
import { defineStore } from 'pinia'
import type { SessionUser } from '@shared/types'
import { ROLE_LABELS } from '@shared/roles'

/** Who is signed in. Set by the router guard and by sign-in; cleared on sign-out or a lost session. */
export const useSessionStore = defineStore('session', () => {
  const user = ref<SessionUser | null>(null)

  const isSignedIn = computed(() => user.value !== null)
  const roleLabel = computed(() => (user.value ? ROLE_LABELS[user.value.role] : ''))

  function setUser(next: SessionUser | null): void {
    user.value = next
  }

  function markPasswordChanged(): void {
    if (user.value) user.value = { ...user.value, mustChangePassword: false }
  }

  function markPasswordChangeRequired(): void {
    if (user.value) user.value = { ...user.value, mustChangePassword: true }
  }

  function markSecondFactorEnrolled(): void {
    if (user.value) user.value = { ...user.value, secondFactorEnrolmentRequired: false }
  }

  function markSecondFactorRequired(): void {
    if (user.value) user.value = { ...user.value, secondFactorEnrolmentRequired: true }
  }

  function clear(): void {
    user.value = null
  }

  return {
    user,
    isSignedIn,
    roleLabel,
    setUser,
    markPasswordChanged,
    markPasswordChangeRequired,
    markSecondFactorEnrolled,
    markSecondFactorRequired,
    clear,
  }
})
