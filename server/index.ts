import { loadConfig } from './config'
import { createSequelize } from './db'
import { createApp } from './app'
import { OutboxWorker } from './services/outboxWorker'
import { MllpListener } from './services/hl7/listener'

/** The only place that listens. Stops cleanly on SIGINT/SIGTERM so the start script can shut MariaDB down after it. */
async function main(): Promise<void> {
  const config = loadConfig()
  const sequelize = createSequelize(config)
  const { app, sessionStore } = createApp(config, sequelize)
  const server = app.listen(config.port, config.host, () => {
    console.log(`Ferrolane listening on http://${config.host}:${config.port}`)
  })
  // Patient e-mails leave from the outbox in this process; several processes may run it side by side.
  const outbox = new OutboxWorker({ sequelize, config })
  outbox.start()
  // Laboratory results, theatre bookings and demographics over HL7 v2 (MLLP), in this process.
  const mllp = config.hl7.enabled ? new MllpListener(sequelize, config, (m) => console.error(m)) : null
  if (mllp) {
    const mllpPort = await mllp.start()
    console.log(`HL7 MLLP listener on ${config.hl7.host}:${mllpPort}`)
  }
  const sweep = setInterval(() => void sessionStore.sweep().catch(() => {}), 10 * 60_000)
  const stop = (signal: string) => {
    console.log(`Ferrolane stopping (${signal})`)
    clearInterval(sweep)
    void mllp?.stop()
    server.close(() => void outbox.stop().finally(() => sequelize.close()).finally(() => process.exit(0)))
    setTimeout(() => process.exit(0), 5000).unref()
  }
  process.on('SIGINT', () => stop('SIGINT'))
  process.on('SIGTERM', () => stop('SIGTERM'))
}

main().catch((err) => {
  console.error(err)
  process.exit(1)
})
