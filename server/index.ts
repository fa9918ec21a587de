import type { Server } from 'node:http'
import { loadConfig } from './config'
import { createSequelize } from './db'
import { createApp } from './app'
import { OutboxWorker } from './services/outboxWorker'
import { productionProblems } from './productionChecks'
import { createLogger } from './observability/logger'

// Until the configuration is read, everything is logged at info; then at LOG_LEVEL.
const log = createLogger('info')

/**
 * The only place that listens. A mistake nobody caught (an unhandled rejection, an uncaught
 * exception) leaves the process in an unknown state: it is logged and the process exits non-zero
 * so the supervisor (the start script, systemd) starts a fresh one. SIGTERM/SIGINT stop it
 * gracefully: no new connections, requests in flight get SHUTDOWN_GRACE_SECONDS to finish, then
 * the outbox worker stops, the pool closes and the process exits 0.
 */
process.on('unhandledRejection', (reason) => {
  log.fatal({ err: reason }, 'unhandled promise rejection; exiting so the supervisor restarts the server')
  process.exit(1)
})
process.on('uncaughtException', (err) => {
  log.fatal({ err }, 'uncaught exception; exiting so the supervisor restarts the server')
  process.exit(1)
})

/** Resolves true once every connection has ended, false if the grace period ran out first. */
function drain(server: Server, graceMs: number): Promise<boolean> {
  return new Promise((resolve) => {
    // close() stops accepting and ends idle keep-alive sockets once; sockets that go idle after
    // their last response are ended by the repeat below.
    const idle = setInterval(() => server.closeIdleConnections(), 100)
    const deadline = setTimeout(() => {
      clearInterval(idle)
      server.closeAllConnections()
      resolve(false)
    }, graceMs)
    server.close(() => {
      clearInterval(idle)
      clearTimeout(deadline)
      resolve(true)
    })
  })
}

async function main(): Promise<void> {
  const config = loadConfig()
  log.level = config.logLevel
  const sequelize = createSequelize(config)
  const { app, sessionStore } = createApp(config, sequelize, { logger: log })
  if (config.env === 'production' && !config.demo) {
    // A real hospital's server refuses to start on development or demo settings.
    const problems = await productionProblems(config)
    if (problems.length) {
      log.fatal(
        { problems },
        `Ferrolane will not start in production:\n${problems.map((p) => `  - ${p}`).join('\n')}\n(npm start runs the demo: ` +
          `FERROLANE_DEMO=true.)`,
      )
      await sequelize.close()
      process.exit(1)
    }
  } else if (config.env === 'production') {
    log.warn('Ferrolane is running the DEMO (FERROLANE_DEMO=true): invented data and public passwords. Never use this for patients.')
  }
  const server = app.listen(config.port, config.host, () => {
    log.info({ host: config.host, port: config.port }, `Ferrolane listening on http://${config.host}:${config.port}`)
  })
  // Patient e-mails leave from the outbox in this process; several processes may run it side by side.
  const outbox = new OutboxWorker({ sequelize, config, log: log.child({ component: 'outbox' }) })
  outbox.start()
  // Laboratory results, theatre bookings and demographics over HL7 v2 (MLLP), in this process.
  // Loaded only when switched on: the HL7 library is not needed by a server without the listener.
  const mllp = config.hl7.enabled
    ? new (await import('./services/hl7/listener')).MllpListener(sequelize, config, (m, err) =>
        log.error({ component: 'hl7', ...(err === undefined ? {} : { err }) }, m),
      )
    : null
  if (mllp) {
    const mllpPort = await mllp.start()
    log.info({ port: mllpPort }, `HL7 MLLP listener on ${config.hl7.host}:${mllpPort}`)
  }
  const sweep = setInterval(() => void sessionStore.sweep().catch(() => {}), 10 * 60_000)
  let stopping = false
  const stop = async (signal: string) => {
    if (stopping) return
    stopping = true
    log.info(`Ferrolane stopping (${signal}): finishing requests in flight (at most ${config.shutdownGraceSeconds} s)`)
    clearInterval(sweep)
    await mllp?.stop().catch((err) => log.error({ err }, 'stopping the MLLP listener failed'))
    const finished = await drain(server, config.shutdownGraceSeconds * 1000)
    if (!finished) log.error('requests still running after the grace period were cut off')
    await outbox.stop().catch((err) => log.error({ err }, 'stopping the outbox worker failed'))
    await sequelize.close().catch((err) => log.error({ err }, 'closing the database pool failed'))
    log.info('Ferrolane stopped')
    process.exit(finished ? 0 : 1)
  }
  process.on('SIGINT', () => void stop('SIGINT'))
  process.on('SIGTERM', () => void stop('SIGTERM'))
}

main().catch((err) => {
  // A configuration mistake is written for the operator; its text holds no patient data.
  log.fatal(
    { err, reason: err instanceof Error && err.message.startsWith('Configuration:') ? err.message : undefined },
    'Ferrolane could not start',
  )
  process.exit(1)
})
