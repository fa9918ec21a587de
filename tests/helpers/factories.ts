import { User } from '../../server/models/index'
import { hashPassword } from '../../server/services/passwords'
import type { Role } from '../../shared/roles'

export const TEST_PASSWORD = 'correct-horse-battery-9'
let hashed: Promise<string> | null = null

let counter = 0
export interface StaffFixture {
  id: number
  email: string
  role: Role
  password: string
}

/** A staff account straight in the database (hashing once per file keeps tests quick). */
export async function makeStaff(
  role: Role,
  overrides: Partial<{ email: string; name: string; active: boolean; mustChangePassword: boolean }> = {},
): Promise<StaffFixture> {
  hashed ??= hashPassword(TEST_PASSWORD)
  counter += 1
  const email = overrides.email ?? `${role}${counter}.${Date.now()}@hospital.test`
  const u = await User.create({
    email,
    name: overrides.name ?? `Test ${role} ${counter}`,
    role,
    passwordHash: await hashed,
    active: overrides.active ?? true,
    mustChangePassword: overrides.mustChangePassword ?? false,
  })
  return { id: u.id, email, role, password: TEST_PASSWORD }
}
