/** Staff roles. Patients never hold an account: they answer through signed links. */
export const ROLES = ['admin', 'nurse', 'doctor', 'surgeon'] as const
export type Role = (typeof ROLES)[number]

/** Words shown to people; identifiers above stay stable for the API. */
export const ROLE_LABELS: Record<Role, string> = {
  admin: 'Administrator',
  nurse: 'Pre-assessment nurse',
  doctor: 'Anaemia clinic doctor',
  surgeon: 'Surgeon',
}

export function isRole(value: unknown): value is Role {
  return typeof value === 'string' && (ROLES as readonly string[]).includes(value)
}
