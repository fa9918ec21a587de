import { Op } from 'sequelize'
import { CLINIC_NOT_SET, type Config } from './config'
import { DEMO_HOSPITAL } from '../seed/demo/hospital'
import { DEMO_ACCOUNTS, DEMO_COLLEAGUES } from '../seed/demo/staff'
import { OWASP_LOG2N } from './services/passwords'
import { User } from './models/index'

/** Values that only the development and demo set-ups use: never acceptable in production. */
export const DEVELOPMENT_SECRETS = ['ferrolane-local-development-secret', 'ferrolane-local-demo-secret-change-me-in-production']
export const DEVELOPMENT_DB_PASSWORD = 'ferrolane-local'

/**
 * What is wrong with this configuration for a real hospital (ASVS 14.1): each line names the
 * variable to set. Empty when the configuration may run in production.
 */
export function configProblems(config: Config): string[] {
  const problems: string[] = []
  if (DEVELOPMENT_SECRETS.includes(config.session.secret))
    problems.push('SESSION_SECRET is the development value: set a long random secret of your own')
  if (!config.session.cookieSecure) problems.push('COOKIE_SECURE is off: serve Ferrolane over HTTPS and set COOKIE_SECURE=true')
  if (config.db.password === DEVELOPMENT_DB_PASSWORD)
    problems.push('DB_PASSWORD is the development password: give the database account its own password')
  const unset = (['name', 'phone', 'email'] as const).filter((k) => config.clinic[k] === CLINIC_NOT_SET[k])
  if (unset.length) {
    const names = unset.map((k) => `CLINIC_${k.toUpperCase()}`).join(', ')
    problems.push(`the clinic's ${unset.join(', ')} ${unset.length === 1 ? 'is' : 'are'} not set: set ${names}`)
  }
  const demoClinic = (['name', 'phone', 'email'] as const).filter((k) => config.clinic[k] === DEMO_HOSPITAL[k])
  if (demoClinic.length) {
    problems.push(
      `the clinic's ${demoClinic.join(', ')} ${demoClinic.length === 1 ? 'is' : 'are'} the invented demo hospital's: set ` +
        `${demoClinic.map((k) => `CLINIC_${k.toUpperCase()}`).join(', ')}`,
    )
  }
  if (config.passwords.scryptLog2N < OWASP_LOG2N)
    problems.push(`PASSWORD_SCRYPT_LOG2N is ${config.passwords.scryptLog2N}: OWASP asks for at least ${OWASP_LOG2N} at r=8, p=3`)
  return problems
}

/** The demo scenario's accounts, whose password is printed in the README. */
export async function demoAccountProblems(): Promise<string[]> {
  const emails = [...DEMO_ACCOUNTS, ...DEMO_COLLEAGUES].map((a) => a.email)
  const found = await User.findAll({ where: { email: { [Op.in]: emails } }, attributes: ['email'], raw: true })
  return found.length
    ? [`the demo accounts exist in this database (${found.map((u) => u.email).join(', ')}): remove them; their password is public`]
    : []
}

/** Everything that stops a production start, config first (no database needed for those). */
export async function productionProblems(config: Config): Promise<string[]> {
  const fromConfig = configProblems(config)
  // A development database password may not even open the real database: report config first.
  if (fromConfig.length) return fromConfig
  return demoAccountProblems()
}
