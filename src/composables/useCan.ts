import { useSessionStore } from '@/stores/session'
import { allows, isOperatingSurgeon, seesOwnPatientsOnly, type Action } from '@shared/permissions'

/**
 * What the signed-in person may do, read from the one permission table (shared/permissions.ts).
 * Each check reads the session store, so a `computed` or a template that calls it follows sign-in
 * and sign-out. Buttons only follow the table; the server checks every call again.
 */
export function useCan() {
  const session = useSessionStore()
  return {
    can: (action: Action): boolean => allows(session.user?.role, action),
    /** Is the signed-in person this episode's operating surgeon? */
    isOperatingSurgeonOf: (episode: { surgeonId: number | null }): boolean =>
      !!session.user && isOperatingSurgeon({ role: session.user.role, userId: session.user.id }, episode),
    /** Surgeons see only their own patients, so screens leave out the surgeon filter for them. */
    ownPatientsOnly: (): boolean => seesOwnPatientsOnly(session.user?.role),
  }
}
