import type { Sequelize } from 'sequelize'
import { User } from '../server/models/index'
import { hashPassword } from '../server/services/passwords'
import { DEMO_ACCOUNTS, DEMO_COLLEAGUES, DEMO_PASSWORD } from './demo/staff'
import { loadDemoEpisodes } from './demo/episodes'
import { loadDemoOutcomes } from './demo/outcomes'
import { loadDemoAppointments } from './demo/appointments'
import { loadDemoDateRequest, loadDemoTreatments, loadFormulary } from './demo/clinic'
import { rebuildEpisodeFacts } from '../server/services/reports/episodeFacts'
import { rebuildMilestones } from '../server/services/reports/referralMilestones'

/**
 * Loads the invented demo scenario, only into an empty database (so a restart keeps real work).
 * Returns whether it loaded anything.
 */
export async function loadDemoScenario(sequelize: Sequelize): Promise<boolean> {
  if ((await User.count()) > 0) return false
  const passwordHash = await hashPassword(DEMO_PASSWORD)
  await sequelize.transaction(async (t) => {
    await User.bulkCreate(
      [...DEMO_ACCOUNTS, ...DEMO_COLLEAGUES].map((s) => ({ ...s, passwordHash, mustChangePassword: false })),
      { transaction: t },
    )
    // The operations catalogue and about forty invented patients across every stage.
    await loadDemoEpisodes(t)
    // Post-operative records, with follow-ups on the closed episodes (closing needs them).
    await loadDemoOutcomes(t)
    // Infusion sessions and a few booked visits (their e-mails recorded as sent, never mailed).
    await loadDemoAppointments(t)
    await loadFormulary(t)
    const staffId = async (email: string) => (await User.findOne({ where: { email }, transaction: t }))!.id
    await loadDemoTreatments(t, await staffId('doctor@ferrolane.test'), await staffId('nurse@ferrolane.test'))
  })
  // Needs the committed episodes: the stored request carries the projection the surgeon saw.
  await loadDemoDateRequest(sequelize)
  // The demo rows were written straight to the tables, not through the services: the quality report's
  // per-episode facts and the funnel's per-referral milestones are built from them from scratch, as after any
  // hand-written data.
  await rebuildEpisodeFacts(sequelize)
  await rebuildMilestones(sequelize)
  return true
}
