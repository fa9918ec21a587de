import type { RouteLocationRaw } from 'vue-router'
import type { Role } from '@shared/roles'

/** Where each role lands after signing in, and what its home page is called. */
export const ROLE_HOMES: Record<Role, { routeName: string; title: string }> = {
  nurse: { routeName: 'nurse-home', title: 'Screening' },
  doctor: { routeName: 'doctor-home', title: 'Anaemia clinic' },
  surgeon: { routeName: 'surgeon-home', title: 'Theatre readiness' },
  admin: { routeName: 'admin-home', title: 'Administration' },
}

export function homeRouteFor(role: Role): { name: string } {
  return { name: ROLE_HOMES[role].routeName }
}

export interface HomeLink {
  to: RouteLocationRaw
  label: string
  description: string
  icon: string
}

/** Links every role's home offers. */
export const accountLinks: HomeLink[] = [
  {
    to: { name: 'change-password' },
    label: 'Change password',
    description: 'Choose a new password for your Ferrolane account.',
    icon: 'pi pi-key',
  },
]

export const worklistLink: HomeLink = {
  to: { name: 'worklist' },
  label: 'Worklist',
  description: 'Every patient on the pathway: filter, sort and open an episode.',
  icon: 'pi pi-list',
}

export const registerLink: HomeLink = {
  to: { name: 'register' },
  label: 'Register a patient',
  description: 'Find or register a patient and record their planned operation.',
  icon: 'pi pi-user-plus',
}
