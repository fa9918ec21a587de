import { loadConfig } from './config'
import { createSequelize } from './db'
import { createApp } from './app'
import { OutboxWorker } from './services/outboxWorker'
import { productionProblems } from './productionChecks'

/** The only place that listens. Stops cleanly on SIGINT/SIGTERM so the start script can shut MariaDB down after it. */
async function main(): Promise<void> {
  const config = loadConfig()
  const sequelize = createSequelize(config)
  const { app, sessionStore } = createApp(config, sequelize)
  if (config.env === 'production' && !config.demo) {
    // A real hospital's server refuses to start on development or demo settings.
    const problems = await productionProblems(config)
    if (problems.length) {
      console.error(`Ferrolane will not start in production:\n${problems.map((p) => `  - ${p}`).join('\n')}\n(npm start runs the demo: FERROLANE_DEMO=true.)`)
      await sequelize.close()
      process.exit(1)
    }
  } else if (config.env === 'production') {
    console.warn('Ferrolane is running the DEMO (FERROLANE_DEMO=true): invented data and public passwords. Never use this for patients.')
  }
  const server = app.listen(config.port, config.host, () => {
    console.log(`Ferrolane listening on http://${config.host}:${config.port}`)
  })
  // Patient e-mails leave from the outbox in this process; several processes may run it side by side.
  const outbox = new OutboxWorker({ sequelize, config })
  outbox.start()
  const sweep = setInterval(() => void sessionStore.sweep().catch(() => {}), 10 * 60_000)
  const stop = (signal: string) => {
    console.log(`Ferrolane stopping (${signal})`)
    clearInterval(sweep)
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
