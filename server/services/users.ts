import type { CreatedUser, TemporaryPassword } from '../../shared/users/views'
import { UniqueConstraintError, type Sequelize } from 'sequelize'
import { User, SessionRow } from '../models/index'
import type { SessionUser, StaffAccount } from '../../shared/types'
import type { CreateUserInput, UpdateUserInput } from '../../shared/schemas/users'
import { hashPassword, temporaryPassword, verifyPassword } from './passwords'
import { recordAudit, changedFields, type Actor } from './audit'
import { Conflict, Invalid, NotFound, RuleRefused } from '../errors'
import { changePasswordSchema } from '../../shared/schemas/auth'
import { isCommonPassword } from './commonPasswords'

/** When a temporary password handed out now stops working (ASVS 2.3.1). */
function temporaryExpiry(temporaryHours: number): Date {
  return new Date(Date.now() + temporaryHours * 3_600_000)
}

type UserRow = InstanceType<typeof User>

export function toSessionUser(u: Pick<UserRow, 'id' | 'email' | 'name' | 'role' | 'mustChangePassword'>): SessionUser {
  return { id: u.id, email: u.email, name: u.name, role: u.role, mustChangePassword: Boolean(u.mustChangePassword) }
}

export function toStaffAccount(u: UserRow): StaffAccount {
  return {
    ...toSessionUser(u),
    active: Boolean(u.active),
    lastSignInAt: u.lastSignInAt ? u.lastSignInAt.toISOString() : null,
    createdAt: u.createdAt.toISOString(),
  }
}

export async function listStaff(): Promise<StaffAccount[]> {
  const rows = await User.findAll({ order: [['name', 'ASC']] })
  return rows.map(toStaffAccount)
}

// Every request resolves its session's user; keeping the answer for a few seconds saves a query
// per request. Changes made in this process forget the entry at once; another process sees a
// role change within USER_CACHE_MS, and a deactivation at once (its sessions are deleted).
const USER_CACHE_MS = 5000
const userCache = new Map<number, { user: SessionUser | null; at: number }>()

export function forgetUser(id: number): void {
  userCache.delete(id)
}

export async function findActiveUser(id: number): Promise<SessionUser | null> {
  const hit = userCache.get(id)
  if (hit && Date.now() - hit.at < USER_CACHE_MS) return hit.user
  const u = await User.findByPk(id, { raw: true })
  const user = u && u.active ? toSessionUser(u) : null
  if (userCache.size > 5000) userCache.clear()
  userCache.set(id, { user, at: Date.now() })
  return user
}

async function loadUser(id: number): Promise<UserRow> {
  const u = await User.findByPk(id)
  if (!u) throw new NotFound('Staff member')
  return u
}

export async function createStaff(
  sequelize: Sequelize,
  actor: Actor,
  input: CreateUserInput,
  temporaryHours: number,
): Promise<CreatedUser> {
  const password = temporaryPassword()
  const passwordHash = await hashPassword(password)
  try {
    return await sequelize.transaction(async (t) => {
      const u = await User.create(
        {
          email: input.email,
          name: input.name,
          role: input.role,
          passwordHash,
          mustChangePassword: true,
          temporaryPasswordExpiresAt: temporaryExpiry(temporaryHours),
        },
        { transaction: t },
      )
      const account = toStaffAccount(u)
      await recordAudit(t, actor, { action: 'create', entity: 'user', entityId: u.id, after: account })
      return { user: account, temporaryPassword: password }
    })
  } catch (err) {
    if (err instanceof UniqueConstraintError) {
      throw new Conflict(`A staff member with the e-mail ${input.email} already exists`, 'duplicate_email', {
        email: 'E-mail is already in use',
      })
    }
    throw err
  }
}

export async function updateStaff(sequelize: Sequelize, actor: Actor, id: number, input: UpdateUserInput): Promise<StaffAccount> {
  if (id === actor.userId && (input.active === false || (input.role && input.role !== 'admin'))) {
    // The last door out of the admin screen must not be closed from inside it.
    throw new RuleRefused('You cannot deactivate yourself or remove your own administrator role')
  }
  return sequelize.transaction(async (t) => {
    const u = await loadUser(id)
    const before = toStaffAccount(u)
    if (input.name !== undefined) u.name = input.name
    if (input.role !== undefined) u.role = input.role
    if (input.active !== undefined) u.active = input.active
    await u.save({ transaction: t })
    const after = toStaffAccount(u)
    if (input.active === false) await SessionRow.destroy({ where: { userId: id }, transaction: t })
    t.afterCommit(() => forgetUser(id))
    const diff = changedFields(before, after)
    await recordAudit(t, actor, { action: 'update', entity: 'user', entityId: id, ...diff })
    return after
  })
}

export async function resetStaffPassword(
  sequelize: Sequelize,
  actor: Actor,
  id: number,
  temporaryHours: number,
): Promise<TemporaryPassword> {
  const password = temporaryPassword()
  const passwordHash = await hashPassword(password)
  return sequelize.transaction(async (t) => {
    const u = await loadUser(id)
    u.passwordHash = passwordHash
    u.mustChangePassword = true
    u.temporaryPasswordExpiresAt = temporaryExpiry(temporaryHours)
    await u.save({ transaction: t })
    // A reset means the old password may be known to someone else: end its sessions too.
    await SessionRow.destroy({ where: { userId: id }, transaction: t })
    t.afterCommit(() => forgetUser(id))
    await recordAudit(t, actor, { action: 'reset-password', entity: 'user', entityId: id, after: { mustChangePassword: true } })
    return { temporaryPassword: password }
  })
}

/**
 * Replaces the signed-in user's password and ends every session they hold, this one included:
 * the route then signs them in again under a new session id (ASVS 3.3.3).
 */
export async function changeOwnPassword(sequelize: Sequelize, actor: Actor & { userId: number }, body: unknown): Promise<SessionUser> {
  const u = await loadUser(actor.userId)
  const input = await changePasswordSchema
    .validate(body, { abortEarly: false, stripUnknown: true, context: { email: u.email } })
    .catch((err: { inner?: { path?: string; message: string }[]; message: string }) => {
      const fields = Object.fromEntries((err.inner ?? []).map((e) => [e.path ?? '_', e.message]))
      throw new Invalid(err.inner?.[0]?.message ?? err.message, fields)
    })
  if (!(await verifyPassword(input.currentPassword, u.passwordHash))) {
    throw new Invalid('Current password is not correct', { currentPassword: 'Current password is not correct' })
  }
  if (await verifyPassword(input.newPassword, u.passwordHash)) {
    throw new Invalid('New password must differ from the current one', { newPassword: 'New password must differ from the current one' })
  }
  if (isCommonPassword(input.newPassword)) {
    const message = 'This password is on a list of common or breached passwords; choose another'
    throw new Invalid(message, { newPassword: message })
  }
  const passwordHash = await hashPassword(input.newPassword)
  await sequelize.transaction(async (t) => {
    u.passwordHash = passwordHash
    u.mustChangePassword = false
    u.temporaryPasswordExpiresAt = null
    await u.save({ transaction: t })
    // Whoever knew the old password may hold a session elsewhere: end them all.
    await SessionRow.destroy({ where: { userId: u.id }, transaction: t })
    t.afterCommit(() => forgetUser(u.id))
    await recordAudit(t, actor, { action: 'change-password', entity: 'user', entityId: u.id })
  })
  return toSessionUser(u)
}
