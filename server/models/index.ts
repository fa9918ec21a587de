import type { Sequelize } from 'sequelize'
import { initUser, User } from './user'
import { initSessionRow, SessionRow } from './session'
import { initAuditEntry, AuditEntry } from './auditEntry'
import { initLoginFailure, LoginFailure } from './loginFailure'

export { User, SessionRow, AuditEntry, LoginFailure }

/**
 * Models are module-level classes bound to one Sequelize instance; a test that builds a
 * second app (to prove sessions survive a restart) rebinds them to its own instance.
 */
export function initModels(sequelize: Sequelize): void {
  initUser(sequelize)
  initSessionRow(sequelize)
  initAuditEntry(sequelize)
  initLoginFailure(sequelize)
  // Associations live here, in one place, as later models arrive.
}
