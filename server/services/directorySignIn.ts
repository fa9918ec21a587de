/**
 * Who a directory identity is in Ferrolane: the account matched by e-mail (or created on first
 * sign-in), its role set from the directory groups at every sign-in. Refusals name their reason
 * so the sign-in page can explain it; none of them changes anything.
 */
import type { Sequelize } from 'sequelize'
import { User } from '../models/index'
import type { OidcConfig } from '../config'
import type { Role } from '../../shared/roles'
import type { SessionUser } from '../../shared/types'
import type { DirectoryRefusal } from '../../shared/auth/views'
import type { DirectoryIdentity } from '../auth/oidcClient'
import { recordAudit, type Actor } from './audit'
import { forgetUser, toSessionUser } from './users'

export class DirectorySignInRefused extends Error {
  constructor(
    readonly reason: DirectoryRefusal,
    message: string,
  ) {
    super(message)
  }
}

// Directory accounts have no local password: this is not a scrypt hash, so no password matches it.
const NO_LOCAL_PASSWORD = '!directory-account'

/** The first group in OIDC_GROUP_ROLES that the person holds decides; order is the policy. */
export function roleForGroups(groupRoles: [string, Role][], groups: string[]): Role | null {
  const held = new Set(groups)
  return groupRoles.find(([group]) => held.has(group))?.[1] ?? null
}

export async function signInFromDirectory(
  sequelize: Sequelize,
  oidc: OidcConfig,
  actor: Actor,
  who: DirectoryIdentity,
): Promise<SessionUser> {
  if (!who.email || !who.emailVerified) throw new DirectorySignInRefused('no-email', 'The directory did not give a verified e-mail address')
  const role = roleForGroups(oidc.groupRoles, who.groups)
  return sequelize.transaction(async (t) => {
    const existing = await User.findOne({ where: { email: who.email! }, transaction: t, lock: t.LOCK.UPDATE })
    if (existing && !existing.active) throw new DirectorySignInRefused('deactivated', 'This Ferrolane account is deactivated')
    if (existing?.directorySubject && existing.directorySubject !== who.subject) {
      throw new DirectorySignInRefused('identity-mismatch', 'This e-mail address belongs to another directory identity')
    }
    if (!role) throw new DirectorySignInRefused('no-role', 'None of your directory groups gives access to Ferrolane')
    const me = { ...actor, userId: existing?.id ?? null }
    if (!existing) {
      const u = await User.create(
        {
          email: who.email!,
          name: who.name || who.email!,
          role,
          passwordHash: NO_LOCAL_PASSWORD,
          directorySubject: who.subject,
          lastSignInAt: new Date(),
        },
        { transaction: t },
      )
      await recordAudit(
        t,
        { ...actor, userId: u.id },
        { action: 'create', entity: 'user', entityId: u.id, after: { ...toSessionUser(u), source: 'directory', groups: who.groups } },
      )
      return toSessionUser(u)
    }
    const before = { role: existing.role, directorySubject: existing.directorySubject }
    // A temporary password never chosen is dropped rather than demanded: the directory vouches for them.
    const dropTemporary = existing.mustChangePassword ? { passwordHash: NO_LOCAL_PASSWORD, mustChangePassword: false } : {}
    await existing.update({ role, directorySubject: who.subject, lastSignInAt: new Date(), ...dropTemporary }, { transaction: t })
    if (before.role !== role || before.directorySubject !== who.subject) {
      await recordAudit(t, me, {
        action: 'update',
        entity: 'user',
        entityId: existing.id,
        before: { role: before.role, directorySubject: before.directorySubject },
        after: { role, directorySubject: who.subject, source: 'directory groups', groups: who.groups },
      })
    }
    forgetUser(existing.id)
    return toSessionUser(existing)
  })
}
