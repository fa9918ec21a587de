import { ClinicalInputError } from '../../shared/clinical'
import type { Role } from '../../shared/roles'
import type { Actor } from './audit'
import { Conflict, Forbidden, Invalid } from '../errors'
import { maySeeEpisode } from '../../shared/permissions'

/** A signed-in member of staff acting on clinical data: who they are and what role they hold. */
export interface Viewer extends Actor {
  userId: number
  role: Role
}

/**
 * Surgeons see only the episodes they operate on (their own list); every other staff role
 * sees the whole service. One rule (shared/permissions.ts), used by every read of patient data.
 */
export function assertMaySeeReferral(viewer: Viewer, surgeonId: number): void {
  if (!maySeeEpisode(viewer, { surgeonId })) {
    throw new Forbidden("This episode is on another surgeon's list", 'not_your_patient')
  }
}

export function staleVersion(what: string): Conflict {
  return new Conflict(`${what} was changed by someone else since you opened it; reload to see the latest version`, 'stale_version', {
    version: 'is out of date',
  })
}

/** The clinical library names its input in each refusal; pass that on as a 400 on our field. */
export function clinical<T>(field: string, compute: () => T): T {
  try {
    return compute()
  } catch (err) {
    if (err instanceof ClinicalInputError) throw new Invalid(err.message, { [field]: err.message })
    throw err
  }
}

/** DATE columns arrive as 'YYYY-MM-DD' strings, DATETIME as Date; the API speaks ISO strings. */
export function isoOrNull(v: Date | string | null | undefined): string | null {
  if (v == null) return null
  return v instanceof Date ? v.toISOString() : new Date(v).toISOString()
}
