/** Migrate, and load the demo scenario when asked and the database is empty. */
import { loadConfig } from '../../server/config'
import { createSequelize } from '../../server/db'
import { setClinicTimeZone } from '../../server/services/clinicDay'
import { migrate } from '../../server/migrate'
import { initModels } from '../../server/models/index'
import { loadDemoScenario } from '../../seed/load'

export async function prepareDatabase(env: NodeJS.ProcessEnv, opts: { seedDemo: boolean }): Promise<boolean> {
  const config = loadConfig(env)
  // Migrations and the demo read clinical days on the clinic's calendar, as the app does.
  setClinicTimeZone(config.clinic.timeZone)
  const sequelize = createSequelize(config)
  try {
    await migrate(sequelize)
    initModels(sequelize)
    return opts.seedDemo ? await loadDemoScenario(sequelize) : false
  } finally {
    await sequelize.close()
  }
}
