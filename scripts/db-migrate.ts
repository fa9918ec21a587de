/** npm run db:migrate: applies pending migrations to the database the environment names (default: npm start's). */
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { migrate } from '../server/migrate'

const sequelize = createSequelize(loadConfig())
migrate(sequelize)
  .then((done) => console.log(done.length ? `applied: ${done.join(', ')}` : 'nothing to apply'))
  .catch((err) => {
    console.error(err)
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
