import { recordAudit, type Actor } from './audit'

/**
 * Refusals worth a trail (ASVS 7.1.3, 7.2.1): failed and locked-out sign-ins, 403s and CSRF
 * refusals. They are written outside any transaction, since the request they describe changed
 * nothing, and never carry a password or a request body.
 */
export type SecurityEvent = 'sign-in-failed' | 'sign-in-locked-out' | 'sign-in-refused' | 'forbidden' | 'csrf-refused'

export async function recordSecurityEvent(
  actor: Actor,
  action: SecurityEvent,
  entityId: string,
  details: Record<string, string>,
): Promise<void> {
  await recordAudit(null, actor, {
    action,
    entity: action.startsWith('sign-in') ? 'session' : 'request',
    entityId: entityId.slice(0, 40),
    after: details,
  })
}
