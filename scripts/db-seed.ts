/** npm run db:seed: loads the invented demo scenario, only into an empty database. */
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { setClinicTimeZone } from '../server/services/clinicDay'
import { initModels } from '../server/models/index'
import { loadDemoScenario } from '../seed/load'

const config = loadConfig()
// Migrations and the demo read clinical days on the clinic's calendar, as the app does.
setClinicTimeZone(config.clinic.timeZone)
const sequelize = createSequelize(config)
initModels(sequelize)
loadDemoScenario(sequelize)
  .then((loaded) => console.log(loaded ? 'demo scenario loaded (invented data)' : 'database not empty: demo not loaded'))
  .catch((err) => {
    console.error(err)
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
