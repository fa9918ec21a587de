/**
 * npm run db:episode-facts: rebuilds the reports' pre-aggregates from scratch, on the database the environment
 * names (default: npm start's): the quality report's per-episode facts (episode_facts, migration 0026) and the
 * funnel's and waiting times' per-referral milestones (referral_milestones, migration 0027). The application
 * keeps both current in every writing transaction; run this after writing to results, outcomes, transfusions,
 * doses, prescriptions, stage moves or surgery-date changes by hand (SQL, a restore of part of a table). Safe
 * while the application runs: one transaction per table, readers see the old rows or the new.
 */
import { loadConfig } from '../server/config'
import { createSequelize } from '../server/db'
import { setClinicTimeZone } from '../server/services/clinicDay'
import { rebuildEpisodeFacts } from '../server/services/reports/episodeFacts'
import { rebuildMilestones } from '../server/services/reports/referralMilestones'

const config = loadConfig()
setClinicTimeZone(config.clinic.timeZone)
const sequelize = createSequelize(config)
rebuildEpisodeFacts(sequelize)
  .then((n) => console.log(`episode_facts rebuilt: ${n} operated episodes`))
  .then(() => rebuildMilestones(sequelize))
  .then((n) => console.log(`referral_milestones rebuilt: ${n} referrals with a milestone`))
  .catch((err) => {
    console.error(err)
    process.exitCode = 1
  })
  .finally(() => sequelize.close())
