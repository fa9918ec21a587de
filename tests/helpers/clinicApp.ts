import { afterAll, beforeAll } from 'vitest'
import { makeTestApp, cleanDatabase, type TestApp } from './app'
import { Client } from './agent'
import { makeStaff, type StaffFixture } from './factories'
import { loadStarterFormulary } from './clinicFactories'
import type { Role } from '../../shared/roles'

/** A prescription's cautions with every answer "no": nothing stands in the way of IV iron. */
export const noCautions = { previousHypersensitivity: false, activeInfection: false, firstTrimester: false, severeLiverDisease: false }

export interface ClinicTestApp {
  /** The file's app; built before the first test. */
  readonly app: TestApp
  /**
   * A clean database with the starter formulary, then one staff member for each role named, made
   * in that order (a role named twice is one person).
   */
  reset<R extends Role>(...roles: R[]): Promise<Record<R, StaffFixture>>
  /** A client signed in as this staff member. */
  signIn(staff: StaffFixture): Promise<Client>
}

/**
 * The clinic API tests' frame: one app for the file, closed after the last test. Call it at the
 * top of the file and `reset` in its beforeEach.
 */
export function clinicTestApp(): ClinicTestApp {
  let t: TestApp | undefined
  const app = () => {
    if (!t) throw new Error('clinicTestApp: the app is built in beforeAll; use it inside a hook or a test')
    return t
  }
  beforeAll(() => {
    t = makeTestApp()
  })
  afterAll(async () => {
    await t?.close()
  })
  return {
    get app() {
      return app()
    },
    async reset<R extends Role>(...roles: R[]) {
      await cleanDatabase(app().sequelize)
      await loadStarterFormulary()
      const staff = {} as Record<R, StaffFixture>
      for (const role of roles) staff[role] = await makeStaff(role)
      return staff
    },
    signIn: (staff) => new Client(app().app).mustSignIn(staff.email, staff.password),
  }
}
