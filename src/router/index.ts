import { createRouter, createWebHistory } from 'vue-router'
import type { RouteLocationNormalized, RouteLocationRaw } from 'vue-router'
import type { Pinia } from 'pinia'
import { setAuthFailureHandler } from '@/api/client'
import { queryClient } from '@/api/queryClient'
import { fetchMe } from '@/api/auth'
import { useSessionStore } from '@/stores/session'
import { getClinicProfile } from '@/api/clinicProfile'
import { useClinicZoneStore } from '@/stores/clinicZone'
import { allows } from '@shared/permissions'
import { homeRouteFor } from './homes'
import { routes } from './routes'
import './meta'

export const router = createRouter({
  history: createWebHistory(),
  routes,
  scrollBehavior: () => ({ top: 0 }),
})

// Asked once per page load, without retries so a down server does not hold up the sign-in page; afterwards sign-in, sign-out and 401s
// keep the store current.
let sessionLoaded: Promise<void> | null = null

function loadSessionOnce(session: ReturnType<typeof useSessionStore>): Promise<void> {
  sessionLoaded ??= fetchMe()
    .then((user) => session.setUser(user))
    .catch(() => {
      // Server unreachable: treat as signed out, and ask again on the next navigation.
      sessionLoaded = null
      session.clear()
    })
  return sessionLoaded
}

// The clinic's zone, once per page load and only when someone is signed in (the route is not
// public). A failure keeps the default and is asked again on the next navigation.
let profileLoaded: Promise<void> | null = null

function loadClinicProfileOnce(zone: ReturnType<typeof useClinicZoneStore>): Promise<void> {
  profileLoaded ??= getClinicProfile()
    .then((p) => zone.setZone(p.timeZone, p.zoneLabel))
    .catch(() => {
      profileLoaded = null
    })
  return profileLoaded
}

// Screens drawn with the sign-in page's small theme (main.ts); all others wait for the whole one.
const SIGN_IN_PAGES = new Set<unknown>(['sign-in', 'sign-in-refused'])
let fullTheme: Promise<void> | null = null

function loadFullThemeOnce(): Promise<void> {
  fullTheme ??= import('@/theme/fullTheme')
    .then((m) => m.applyFullTheme())
    .catch((error: unknown) => {
      fullTheme = null // a failed download (network) is tried again on the next navigation
      throw error
    })
  return fullTheme
}

export function installGuards(pinia: Pinia): void {
  const session = useSessionStore(pinia)
  const clinicZone = useClinicZoneStore(pinia)

  router.beforeEach(async (to) => {
    const decision = await decide(to)
    if (decision === true && !SIGN_IN_PAGES.has(to.name)) await loadFullThemeOnce()
    return decision
  })

  async function decide(to: RouteLocationNormalized): Promise<RouteLocationRaw | true> {
    await loadSessionOnce(session)
    const user = session.user

    if (to.meta.public) return user && to.name === 'sign-in' ? homeRouteFor(user.role) : true
    if (!user) {
      return { name: 'sign-in', query: to.fullPath === '/' ? {} : { redirect: to.fullPath } }
    }
    // Before the clinic profile: that call is closed until the password or authenticator is set up.
    if (user.mustChangePassword && to.name !== 'change-password') return { name: 'change-password' }
    if (user.secondFactorEnrolmentRequired && to.name !== 'second-factor') return { name: 'second-factor' }
    if (!user.mustChangePassword && !user.secondFactorEnrolmentRequired) await loadClinicProfileOnce(clinicZone)
    if (to.name === 'home') return homeRouteFor(user.role)
    if (to.meta.action && !allows(user.role, to.meta.action)) return { name: 'forbidden', query: { from: to.fullPath } }
    return true
  }

  // A call failed because the session ended or a new password is due: send the person where
  // they can act on it. Ignored when no one was signed in (a wrong password also answers 401).
  setAuthFailureHandler((error) => {
    if (!session.user) return
    if (error.code === 'password_change_required') {
      session.markPasswordChangeRequired()
      void router.push({ name: 'change-password' })
      return
    }
    if (error.code === 'second_factor_enrolment_required') {
      session.markSecondFactorRequired()
      void router.push({ name: 'second-factor' })
      return
    }
    const from = router.currentRoute.value.fullPath
    session.clear()
    queryClient.removeQueries()
    void router.push({ name: 'sign-in', query: { redirect: from, reason: 'expired' } })
  })

  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Ferrolane` : 'Ferrolane'
  })
}
