import express, { type Express, type Request, type RequestHandler, type Response } from 'express'
import session from 'express-session'
import helmet from 'helmet'
import path from 'node:path'
import { existsSync } from 'node:fs'
import type { Sequelize } from 'sequelize'
import type { PassportStatic } from 'passport'
import type { Config } from './config'
import { setClinicTimeZone } from './services/clinicDay'
import { initModels } from './models/index'
import { MariaDbSessionStore } from './auth/sessionStore'
import { createPassport } from './auth/passport'
import { requestId } from './middleware/requestId'
import { requireCsrf } from './middleware/csrf'
import { signInThrottle } from './middleware/signInThrottle'
import { jsonBody } from './middleware/jsonBody'
import { screenRequest } from './middleware/validate'
import { absoluteSessionLifetime } from './middleware/sessionLifetime'
import { setPasswordCost } from './services/passwords'
import { apiNotFound, errorHandler } from './middleware/errors'
import type { ApiRouter, RouteSpec } from './routes/apiRouter'
import { setViewAuditWindow } from './services/audit'
import type { AppContext } from './routes/context'
import { healthRoutes } from './routes/health'
import { authRoutes } from './routes/auth'
import { directoryAuthRoutes } from './routes/directoryAuth'
import { secondFactorRoutes } from './routes/secondFactor'
import { userRoutes } from './routes/users'
import { staffRoutes } from './routes/staff'
import { patientRoutes } from './routes/patients'
import { procedureRoutes } from './routes/procedures'
import { referralRoutes } from './routes/referrals'
import { worklistRoutes } from './routes/worklist'
import { appointmentRoutes, referralAppointmentRoutes } from './routes/appointments'
import { episodeUpdateRoutes } from './routes/episodeUpdates'
import { infusionSessionRoutes } from './routes/infusionSessions'
import { outboxRoutes } from './routes/outbox'
import { appointmentTaskRoutes } from './routes/appointmentTasks'
import { replyRoutes } from './routes/replies'
import { clinicRoutes } from './routes/clinic'
import { formularyRoutes } from './routes/formulary'
import { clinicSettingsRoutes } from './routes/clinicSettings'
import { readinessRoutes } from './routes/readiness'
import { outcomeRoutes } from './routes/outcomes'
import { transfusionRoutes } from './routes/transfusions'
import { reportRoutes } from './routes/reports'
import { auditRoutes } from './routes/audit'
import { clinicProfileRoutes } from './routes/clinicProfile'
import { documentDownloadRoutes, documentRoutes } from './routes/documents'
import { appointmentLetterRoutes, letterDownloadRoutes, letterRoutes } from './routes/letters'
import { fhirExportRoutes } from './routes/fhirExport'
import { importRoutes } from './routes/imports'
import { interfaceRoutes } from './routes/interfaces'
import type { Logger } from 'pino'
import { createLogger, httpLogger } from './observability/logger'
import { createMetrics, type AppMetrics } from './observability/metrics'
import { metricsRoute } from './observability/metricsRoute'

export const SESSION_COOKIE = 'ferrolane.sid'

export interface FerrolaneApp {
  app: Express
  logger: Logger
  metrics: AppMetrics
  routes: RouteSpec[]
  sessionStore: MariaDbSessionStore
}

function contentSecurityPolicy(config: Config) {
  return helmet({
    contentSecurityPolicy: {
      useDefaults: false,
      directives: {
        defaultSrc: ["'self'"],
        scriptSrc: ["'self'"],
        // PrimeVue writes its theme into <style> elements at run time.
        styleSrc: ["'self'", "'unsafe-inline'"],
        imgSrc: ["'self'", 'data:'],
        fontSrc: ["'self'", 'data:'],
        connectSrc: ["'self'"],
        objectSrc: ["'none'"],
        baseUri: ["'self'"],
        formAction: ["'self'"],
        frameAncestors: ["'none'"],
        ...(config.session.cookieSecure ? { upgradeInsecureRequests: [] } : {}),
      },
    },
    strictTransportSecurity: config.session.cookieSecure,
  })
}

/**
 * Helmet's headers are the same on every answer here (no nonces, nothing read from the request),
 * yet its middleware rebuilds them per request (the policy's text among them). They are taken
 * from helmet once, at start-up, and set by one loop; helmet still decides what they are. A
 * middleware that did not answer at once (it would depend on the request) is used as it is.
 */
function fixedHeaders(middleware: RequestHandler): RequestHandler {
  const set: [string, number | string | readonly string[]][] = []
  const removed: string[] = []
  const recorder = {
    setHeader(name: string, value: number | string | readonly string[]) {
      set.push([name, value])
      return recorder
    },
    removeHeader(name: string) {
      removed.push(name)
    },
  }
  let answered = false
  void middleware({} as Request, recorder as unknown as Response, (err?: unknown) => {
    answered = err === undefined
  })
  if (!answered) return middleware
  return (_req, res, next) => {
    for (const name of removed) res.removeHeader(name)
    for (const [name, value] of set) res.setHeader(name, value)
    next()
  }
}

/** Builds the whole app without listening, so tests can drive it with Supertest. */
export function createApp(config: Config, sequelize: Sequelize, opts: { logger?: Logger } = {}): FerrolaneApp {
  initModels(sequelize)
  setViewAuditWindow(config.auditViewWindowMinutes)
  setClinicTimeZone(config.clinic.timeZone)
  setPasswordCost(config.passwords.scryptLog2N)
  const ctx: AppContext = { config, sequelize }
  const app = express()
  app.disable('x-powered-by')
  app.set('trust proxy', config.trustProxy)
  app.use(requestId)
  const logger = opts.logger ?? createLogger(config.logLevel)
  const metrics = createMetrics(sequelize, config.db.poolMax)
  app.locals.metrics = metrics
  app.use(httpLogger(logger))
  app.use(metrics.observe)
  app.get('/metrics', metricsRoute(config, metrics))
  app.use(fixedHeaders(contentSecurityPolicy(config)))

  const sessionStore = new MariaDbSessionStore(config.session.idleMinutes * 60_000)
  const passport = createPassport() as unknown as PassportStatic
  const api = express.Router()
  // Answers carry patient data: no browser or proxy may keep a copy (ASVS 8.2.1). Express still
  // sets ETags, so a client that asks with If-None-Match gets a 304 without the body.
  api.use((_req, res, next) => {
    res.set('Cache-Control', 'no-store')
    next()
  })
  api.use(jsonBody({ limit: '1mb' }))
  api.use(
    session({
      name: SESSION_COOKIE,
      secret: config.session.secret,
      store: sessionStore,
      resave: false,
      saveUninitialized: false,
      rolling: true, // the idle timeout restarts with every request
      cookie: { httpOnly: true, sameSite: 'lax', secure: config.session.cookieSecure, maxAge: config.session.idleMinutes * 60_000 },
    }),
  )
  api.use(passport.initialize())
  api.use(passport.session())
  api.use('/auth/login', signInThrottle(config))
  api.use(absoluteSessionLifetime(config.session.absoluteHours))
  api.use(requireCsrf)
  api.use(screenRequest)

  const routers: ApiRouter[] = [
    healthRoutes(ctx),
    authRoutes(ctx, passport),
    directoryAuthRoutes(ctx),
    secondFactorRoutes(ctx),
    userRoutes(ctx),
    staffRoutes(ctx),
    patientRoutes(ctx),
    procedureRoutes(ctx),
    referralRoutes(ctx),
    worklistRoutes(ctx),
    clinicRoutes(ctx),
    formularyRoutes(ctx),
    clinicSettingsRoutes(ctx),
    readinessRoutes(ctx),
    appointmentRoutes(ctx),
    referralAppointmentRoutes(ctx),
    episodeUpdateRoutes(ctx),
    infusionSessionRoutes(ctx),
    outboxRoutes(ctx),
    appointmentTaskRoutes(ctx),
    replyRoutes(ctx),
    outcomeRoutes(ctx),
    transfusionRoutes(ctx),
    reportRoutes(ctx),
    auditRoutes(ctx),
    clinicProfileRoutes(ctx),
    documentRoutes(ctx),
    documentDownloadRoutes(ctx),
    letterRoutes(ctx),
    appointmentLetterRoutes(ctx),
    letterDownloadRoutes(ctx),
    fhirExportRoutes(ctx),
    importRoutes(ctx),
    interfaceRoutes(ctx),
  ]
  for (const r of routers) api.use(r.prefix.replace(/^\/api/, ''), r.router)
  api.use(apiNotFound)
  api.use(errorHandler)
  app.use('/api', api)

  const staticDir = path.resolve(config.staticDir || 'dist')
  if (config.staticDir && existsSync(path.join(staticDir, 'index.html'))) {
    app.use(express.static(staticDir, { index: false, maxAge: '1h' }))
    // The client owns every other path (history-mode routing). `root` because send() refuses an
    // absolute path through a dot-directory, and the test build lives in .test-data/.
    app.get(/^(?!\/api\/).*/, (_req, res) => res.sendFile('index.html', { root: staticDir }))
  }
  app.use(errorHandler)
  return { app, logger, metrics, routes: routers.flatMap((r) => r.specs), sessionStore }
}
