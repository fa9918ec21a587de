/**
 * npm run db:episode-facts: rebuilds the quality report's per-episode pre-aggregate (episode_facts, migration
 * 0026) from scratch and checks it, on the database the environment names (default: npm start's). The
 * application keeps the table current in every writing transaction; run this after writing to results,
 * outcomes, transfusions, doses, prescriptions or surgery-date changes by hand (SQL, a restore of part of a
 * table). Safe while the application runs: one transaction, readers see the old rows or the new.
 */
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { setClinicTimeZone } from '../server/services/clinicDay'
import { rebuildEpisodeFacts } from '../server/services/reports/episodeFacts'

const config = loadConfig()
setClinicTimeZone(config.clinic.timeZone)
const sequelize = createSequelize(config)
rebuildEpisodeFacts(sequelize)
  .then((n) => console.log(`episode_facts rebuilt: ${n} operated episodes`))
  .catch((err) => {
    console.error(err)
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
