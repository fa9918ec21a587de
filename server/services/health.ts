import { QueryTypes, type Sequelize } from 'sequelize'

const DB_CHECK_TIMEOUT_MS = 2000

/** A cheap round trip, bounded in time so a hung database reads as "down", not as a hung probe. */
export async function databaseIsUp(sequelize: Sequelize): Promise<boolean> {
  let timer: NodeJS.Timeout | undefined
  const timeout = new Promise<never>((_, reject) => {
    timer = setTimeout(() => reject(new Error('timeout')), DB_CHECK_TIMEOUT_MS)
  })
  try {
    await Promise.race([sequelize.query('SELECT 1', { type: QueryTypes.SELECT }), timeout])
    return true
  } catch {
    return false
  } finally {
    clearTimeout(timer)
  }
}
