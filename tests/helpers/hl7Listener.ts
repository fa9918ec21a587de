import type { Sequelize } from 'sequelize'
import type { Config } from '../../server/config'
import { MllpListener } from '../../server/services/hl7/listener'

/**
 * A real MLLP listener on a free port over the test's database: the app's configuration with the
 * listener switched on, and any limits a test narrows. Stop it with `listener.stop()`.
 */
export async function startTestListener(
  sequelize: Sequelize,
  config: Config,
  hl7: Partial<Config['hl7']> = {},
): Promise<{ listener: MllpListener; port: number }> {
  const listener = new MllpListener(sequelize, { ...config, hl7: { ...config.hl7, enabled: true, port: 0, ...hl7 } })
  return { listener, port: await listener.start() }
}
