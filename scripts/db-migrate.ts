/** npm run db:migrate: applies pending migrations to the database the environment names (default: npm start's). */
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { setClinicTimeZone } from '../server/services/clinicDay'
import { migrate } from '../server/migrate'

const config = loadConfig()
// Migrations and the demo read clinical days on the clinic's calendar, as the app does.
setClinicTimeZone(config.clinic.timeZone)
const sequelize = createSequelize(config)
migrate(sequelize)
  .then((done) => console.log(done.length ? `applied: ${done.join(', ')}` : 'nothing to apply'))
  .catch((err) => {
    console.error(err)
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
