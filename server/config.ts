/**
 * The one place that reads process.env. Each key names its environment variable; the whole
 * config is checked at boot so a typo fails loudly instead of running with a wrong default.
 */
import path from 'node:path'
import { isTimeZone } from '../shared/appointments/time'
import { LIMITS } from '../shared/limits'
import { isRole, type Role } from '../shared/roles'
import { LOCAL_SIGN_IN_MODES, type LocalSignInMode } from '../shared/auth/views'

export interface Config {
  env: 'production' | 'development' | 'test'
  /** FERROLANE_DEMO: the demo scenario (npm start); production checks are skipped with a warning */ demo: boolean
  /** PORT */ port: number
  /** HOST */ host: string
  db: {
    /** DB_HOST */ host: string
    /** DB_PORT */ port: number
    /** DB_SOCKET: a local server's Unix socket, used instead of host and port when set */ socket: string | null
    /** DB_NAME */ name: string
    /** DB_USER */ user: string
    /** DB_PASSWORD */ password: string
    /** DB_POOL_MAX */ poolMax: number
  }
  session: {
    /** SESSION_SECRET */ secret: string
    /** SESSION_IDLE_MINUTES */ idleMinutes: number
    /** SESSION_ABSOLUTE_HOURS: a session ends this long after sign-in, however active */ absoluteHours: number
    /** COOKIE_SECURE: true behind TLS */ cookieSecure: boolean
  }
  passwords: {
    /** PASSWORD_SCRYPT_LOG2N: scrypt cost N as a power of two, with r=8, p=3 (OWASP: at least 15 at p=3) */ scryptLog2N: number
    /** TEMP_PASSWORD_HOURS: a temporary password from an administrator stops working after this */ temporaryHours: number
  }
  /** TRUST_PROXY: hops of reverse proxy to trust for the client address */ trustProxy: number
  /** LOG_LEVEL: pino's level for the JSON log on stdout (silent in tests unless set) */ logLevel: LogLevel
  /** METRICS_TOKEN: bearer token for /metrics from other machines; empty: loopback only */ metricsToken: string | null
  login: {
    /** LOGIN_MAX_FAILURES_ACCOUNT */ maxFailuresPerAccount: number
    /** LOGIN_MAX_FAILURES_ADDRESS */ maxFailuresPerAddress: number
    /** LOGIN_WINDOW_MINUTES */ windowMinutes: number
  }
  smtp: {
    /** SMTP_HOST */ host: string
    /** SMTP_PORT */ port: number
    /** MAIL_FROM */ from: string
    /** SMTP_REQUIRE_TLS: refuse to send unless the relay upgrades to TLS (STARTTLS) */ requireTls: boolean
    /** SMTP_TLS_REJECT_UNAUTHORIZED: check the relay's certificate (leave on outside a laboratory) */ tlsRejectUnauthorized: boolean
    /** SMTP_TLS_CA_FILE: PEM file of the hospital's own certificate authority, when the relay uses one */ tlsCaFile: string | null
    /** SMTP_TLS_SERVERNAME: the name on the relay's certificate, when it differs from SMTP_HOST */ tlsServername: string | null
  }
  /** The clinic named in patient e-mails and on the reply page (defaults: the invented demo hospital). */
  clinic: {
    /** CLINIC_NAME */ name: string
    /** CLINIC_SERVICE */ service: string
    /** CLINIC_PHONE: the number patients are told to call */ phone: string
    /** CLINIC_EMAIL: organiser of calendar invitations */ email: string
    /** CLINIC_TIME_ZONE: IANA zone appointments are stated in */ timeZone: string
  }
  outbox: {
    /** OUTBOX_POLL_MS: how often the worker looks for mail to send */ pollMs: number
    /** OUTBOX_MAX_ATTEMPTS: sends tried before a message is marked failed */ maxAttempts: number
    /** OUTBOX_RETRY_BASE_SECONDS: first retry delay, doubled after each failure */ retryBaseSeconds: number
    /** OUTBOX_LEASE_SECONDS: a claimed message not finished by then may be claimed again */ leaseSeconds: number
    /** REMINDER_DAYS_BEFORE: days before an appointment its reminder goes; 0 turns reminders off */ reminderDaysBefore: number
  }
  replies: {
    /** REPLY_MAX_BAD_TOKENS: unknown reply links per address before 429 */ maxBadTokensPerAddress: number
    /** REPLY_WINDOW_MINUTES: throttling window for reply links */ windowMinutes: number
    /** REPLY_LINK_DAYS: a reply link stops working this many days after it is sent (and when the appointment ends) */ linkDays: number
  }
  imports: {
    /** IMPORT_MAX_CSV_ROWS: data rows one laboratory CSV upload may hold */ maxCsvRows: number
  }
  /** STATIC_DIR: the built client; empty disables serving it */ staticDir: string
  /** PUBLIC_URL: base of links in e-mails */ publicUrl: string
  /** UPLOAD_DIR: where episode documents and letters are stored, outside the web root */ uploadDir: string
  /** PATIENT_ID_SYSTEM: URI naming the hospital number (MRN) in FHIR exports */ patientIdSystem: string
  /** SHUTDOWN_GRACE_SECONDS: on SIGTERM, how long requests in flight may take to finish */ shutdownGraceSeconds: number
  /** AUDIT_VIEW_WINDOW_MINUTES: a background read of the same record by the same user is audited once per window */
  auditViewWindowMinutes: number
  /** Sign-in through the hospital's OpenID Connect provider; null when OIDC_ISSUER is empty. */
  oidc: OidcConfig | null
  /** LOCAL_SIGN_IN: on | admins-only | off — local passwords kept as break glass */ localSignIn: LocalSignInMode
  /** ADMIN_SECOND_FACTOR_REQUIRED: admins signing in with a local password must enrol and use TOTP */ adminSecondFactorRequired: boolean
  hl7: {
    /** HL7_MLLP_ENABLED: listen for HL7 v2 messages over MLLP (npm start turns it on) */ enabled: boolean
    /** HL7_MLLP_HOST */ host: string
    /** HL7_MLLP_PORT: 0 picks a free port (the tests) */ port: number
    /** HL7_ASSIGNING_AUTHORITY: PID-3 assigning authority of the hospital number (MRN) */ assigningAuthority: string
    /** HL7_RETENTION_DAYS: messages older than this are deleted, unless they still need attention */ retentionDays: number
    /** HL7_MAX_MESSAGE_BYTES */ maxMessageBytes: number
    /** HL7_IDLE_TIMEOUT_SECONDS: a connection silent this long is closed */ idleTimeoutSeconds: number
    /** HL7_PARTIAL_TIMEOUT_SECONDS: a message begun but not finished this long is dropped with its connection */
    partialTimeoutSeconds: number
    /** HL7_MAX_CONNECTIONS */ maxConnections: number
  }
}

export interface OidcConfig {
  /** OIDC_ISSUER */ issuer: string
  /** OIDC_CLIENT_ID */ clientId: string
  /** OIDC_CLIENT_SECRET */ clientSecret: string
  /** OIDC_REDIRECT_URI: default PUBLIC_URL + /api/auth/oidc/callback */ redirectUri: string
  /** OIDC_POST_LOGOUT_REDIRECT_URI: default PUBLIC_URL + /sign-in?signedOut=1 */ postLogoutRedirectUri: string
  /** OIDC_SCOPES */ scopes: string
  /** OIDC_ROLES_CLAIM: the claim holding the directory groups */ rolesClaim: string
  /** OIDC_GROUP_ROLES: `Group=role,Group=role`; the first listed group the person holds decides */ groupRoles: [string, Role][]
  /** OIDC_DISPLAY_NAME: shown as "Sign in with …" */ displayName: string
}

type Env = Record<string, string | undefined>

function int(env: Env, key: string, fallback: number, min = 0, max = 65535): number {
  const raw = env[key]
  if (raw === undefined || raw === '') return fallback
  const n = Number(raw)
  if (!Number.isInteger(n) || n < min || n > max) {
    throw new Error(`Configuration: ${key} must be an integer between ${min} and ${max} (got "${raw}")`)
  }
  return n
}

function bool(env: Env, key: string, fallback: boolean): boolean {
  const raw = env[key]
  if (raw === undefined || raw === '') return fallback
  if (['1', 'true', 'yes'].includes(raw.toLowerCase())) return true
  if (['0', 'false', 'no'].includes(raw.toLowerCase())) return false
  throw new Error(`Configuration: ${key} must be true or false (got "${raw}")`)
}

function timeZone(env: Env, key: string, fallback: string): string {
  const raw = env[key] || fallback
  if (!isTimeZone(raw)) throw new Error(`Configuration: ${key} must be an IANA time zone such as Europe/London (got "${raw}")`)
  return raw
}

/**
 * The clinic's details until a site sets its own: neutral words that say what is missing, never a
 * real-looking hospital. Production refuses to start on them (productionChecks.ts); npm start and
 * npm test pass the invented demo hospital's (seed/demo/hospital.ts).
 */
export const CLINIC_NOT_SET = {
  name: 'the hospital (CLINIC_NAME not set)',
  service: 'Pre-operative Anaemia Service',
  phone: '(CLINIC_PHONE not set)',
  email: 'clinic-email-not-set@ferrolane.invalid',
  timeZone: 'Europe/London',
} as const

// An invented URI on the reserved .test domain: a real hospital sets its own (often an OID, urn:oid:…).
const DEMO_PATIENT_ID_SYSTEM = 'https://kestrelvale.ferrolane.test/id/hospital-number'

function uri(env: Env, key: string, fallback: string): string {
  const raw = env[key] || fallback
  if (!/^(https?:\/\/[^\s]+|urn:[a-z0-9][a-z0-9-]*:[^\s]+)$/i.test(raw))
    throw new Error(`Configuration: ${key} must be an absolute URI (http(s):// or urn:) (got "${raw}")`)
  return raw
}

function groupRoles(raw: string): [string, Role][] {
  const pairs = raw
    .split(',')
    .map((p) => p.trim())
    .filter(Boolean)
    .map((p) => {
      const at = p.lastIndexOf('=')
      const group = p.slice(0, at).trim()
      const role = p.slice(at + 1).trim()
      if (at <= 0 || !group || !isRole(role))
        throw new Error(
          `Configuration: OIDC_GROUP_ROLES entries are Group=role with role one of admin, nurse, doctor, surgeon (got "${p}")`,
        )
      return [group, role] as [string, Role]
    })
  if (pairs.length === 0)
    throw new Error('Configuration: OIDC_GROUP_ROLES must map at least one directory group to a role when OIDC_ISSUER is set')
  return pairs
}

function oidc(env: Env, publicUrl: string): OidcConfig | null {
  const issuer = env.OIDC_ISSUER?.trim()
  if (!issuer) return null
  uri(env, 'OIDC_ISSUER', issuer)
  const clientId = env.OIDC_CLIENT_ID?.trim() ?? ''
  if (!clientId) throw new Error('Configuration: OIDC_CLIENT_ID is required when OIDC_ISSUER is set')
  const scopes = (env.OIDC_SCOPES || 'openid email profile groups').trim()
  if (!scopes.split(/\s+/).includes('openid')) throw new Error('Configuration: OIDC_SCOPES must include openid')
  return {
    issuer,
    clientId,
    clientSecret: env.OIDC_CLIENT_SECRET ?? '',
    redirectUri: uri(env, 'OIDC_REDIRECT_URI', `${publicUrl}/api/auth/oidc/callback`),
    postLogoutRedirectUri: uri(env, 'OIDC_POST_LOGOUT_REDIRECT_URI', `${publicUrl}/sign-in?signedOut=1`),
    scopes,
    rolesClaim: env.OIDC_ROLES_CLAIM || 'groups',
    groupRoles: groupRoles(env.OIDC_GROUP_ROLES ?? ''),
    displayName: env.OIDC_DISPLAY_NAME || 'the hospital directory',
  }
}

function localSignIn(env: Env): LocalSignInMode {
  const raw = env.LOCAL_SIGN_IN || 'on'
  if (!(LOCAL_SIGN_IN_MODES as readonly string[]).includes(raw))
    throw new Error(`Configuration: LOCAL_SIGN_IN must be on, admins-only or off (got "${raw}")`)
  return raw as LocalSignInMode
}

const LOG_LEVELS = ['fatal', 'error', 'warn', 'info', 'debug', 'trace', 'silent'] as const
export type LogLevel = (typeof LOG_LEVELS)[number]

function logLevel(env: Env, nodeEnv: Config['env']): LogLevel {
  const raw = env.LOG_LEVEL || (nodeEnv === 'test' ? 'silent' : 'info')
  if (!(LOG_LEVELS as readonly string[]).includes(raw)) throw new Error(`Configuration: LOG_LEVEL must be one of ${LOG_LEVELS.join(', ')}`)
  return raw as LogLevel
}

// A scraper sends it on every request; a short one could be guessed.
function metricsToken(env: Env): string | null {
  const raw = env.METRICS_TOKEN || ''
  if (!raw) return null
  if (raw.length < 24) throw new Error('Configuration: METRICS_TOKEN must be at least 24 characters (or empty for loopback-only metrics)')
  return raw
}

export function loadConfig(env: Env = process.env): Config {
  const nodeEnv = env.NODE_ENV === 'production' || env.NODE_ENV === 'test' ? env.NODE_ENV : 'development'
  const secret = env.SESSION_SECRET ?? (nodeEnv === 'production' ? '' : 'ferrolane-local-development-secret')
  if (secret.length < 16) throw new Error('Configuration: SESSION_SECRET must be at least 16 characters')
  const port = int(env, 'PORT', 8080, 0)
  const publicUrl = (env.PUBLIC_URL || `http://127.0.0.1:${port}`).replace(/\/$/, '')
  const local = localSignIn(env)
  const oidcConfig = oidc(env, publicUrl)
  if (local !== 'on' && !oidcConfig)
    throw new Error(`Configuration: LOCAL_SIGN_IN=${local} needs OIDC_ISSUER, or nobody but admins could sign in`)
  return {
    env: nodeEnv,
    demo: bool(env, 'FERROLANE_DEMO', false),
    port,
    host: env.HOST || '127.0.0.1',
    db: {
      host: env.DB_HOST || '127.0.0.1',
      port: int(env, 'DB_PORT', 3406, 1),
      socket: env.DB_SOCKET || null,
      name: env.DB_NAME || 'ferrolane',
      user: env.DB_USER || 'ferrolane',
      password: env.DB_PASSWORD ?? 'ferrolane-local',
      poolMax: int(env, 'DB_POOL_MAX', 20, 1, 500),
    },
    session: {
      secret,
      idleMinutes: int(env, 'SESSION_IDLE_MINUTES', 30, 1, 24 * 60),
      absoluteHours: int(env, 'SESSION_ABSOLUTE_HOURS', 12, 1, 24 * 7),
      cookieSecure: bool(env, 'COOKIE_SECURE', false),
    },
    passwords: {
      // The test run lowers the cost: its hundreds of sign-ins would otherwise take minutes.
      scryptLog2N: int(env, 'PASSWORD_SCRYPT_LOG2N', nodeEnv === 'test' ? 13 : 15, 10, 20),
      temporaryHours: int(env, 'TEMP_PASSWORD_HOURS', 72, 1, 24 * 30),
    },
    trustProxy: int(env, 'TRUST_PROXY', 0, 0, 10),
    logLevel: logLevel(env, nodeEnv),
    metricsToken: metricsToken(env),
    login: {
      maxFailuresPerAccount: int(env, 'LOGIN_MAX_FAILURES_ACCOUNT', 5, 1, 1000),
      maxFailuresPerAddress: int(env, 'LOGIN_MAX_FAILURES_ADDRESS', 30, 1, 10000),
      windowMinutes: int(env, 'LOGIN_WINDOW_MINUTES', 15, 1, 24 * 60),
    },
    smtp: {
      host: env.SMTP_HOST || '127.0.0.1',
      port: int(env, 'SMTP_PORT', 1025, 1),
      // Neutral sender name: an inbox preview must not tell a family member what the clinic treats.
      from: env.MAIL_FROM || 'Hospital appointments <no-reply@ferrolane.test>',
      requireTls: bool(env, 'SMTP_REQUIRE_TLS', false),
      tlsRejectUnauthorized: bool(env, 'SMTP_TLS_REJECT_UNAUTHORIZED', true),
      tlsCaFile: env.SMTP_TLS_CA_FILE || null,
      tlsServername: env.SMTP_TLS_SERVERNAME || null,
    },
    clinic: {
      name: env.CLINIC_NAME || CLINIC_NOT_SET.name,
      service: env.CLINIC_SERVICE || CLINIC_NOT_SET.service,
      phone: env.CLINIC_PHONE || CLINIC_NOT_SET.phone,
      email: env.CLINIC_EMAIL || CLINIC_NOT_SET.email,
      timeZone: timeZone(env, 'CLINIC_TIME_ZONE', CLINIC_NOT_SET.timeZone),
    },
    outbox: {
      pollMs: int(env, 'OUTBOX_POLL_MS', 5000, 100, 3_600_000),
      maxAttempts: int(env, 'OUTBOX_MAX_ATTEMPTS', 8, 1, 100),
      retryBaseSeconds: int(env, 'OUTBOX_RETRY_BASE_SECONDS', 30, 1, 86_400),
      // At least the SMTP time budget plus the outcome's retry window (outboxWorker.ts), with room for a batch.
      leaseSeconds: int(env, 'OUTBOX_LEASE_SECONDS', 120, 90, 86_400),
      reminderDaysBefore: int(env, 'REMINDER_DAYS_BEFORE', 2, 0, 60),
    },
    replies: {
      maxBadTokensPerAddress: int(env, 'REPLY_MAX_BAD_TOKENS', 10, 1, 10000),
      windowMinutes: int(env, 'REPLY_WINDOW_MINUTES', 15, 1, 24 * 60),
      linkDays: int(env, 'REPLY_LINK_DAYS', 14, 1, 365),
    },
    imports: {
      maxCsvRows: int(env, 'IMPORT_MAX_CSV_ROWS', LIMITS.csvRows, 1, 2_000_000),
    },
    staticDir: env.STATIC_DIR ?? 'dist',
    publicUrl,
    // Resolved once so a later chdir cannot move the store; the start and test scripts point it into their data dir.
    uploadDir: path.resolve(env.UPLOAD_DIR || '.data/uploads'),
    patientIdSystem: uri(env, 'PATIENT_ID_SYSTEM', DEMO_PATIENT_ID_SYSTEM),
    shutdownGraceSeconds: int(env, 'SHUTDOWN_GRACE_SECONDS', 10, 1, 600),
    auditViewWindowMinutes: int(env, 'AUDIT_VIEW_WINDOW_MINUTES', 15, 0, 24 * 60),
    oidc: oidcConfig,
    localSignIn: local,
    // On unless switched off: the test stack switches it off because its tests sign admins in
    // with a password everywhere; the second-factor tests switch it back on.
    adminSecondFactorRequired: bool(env, 'ADMIN_SECOND_FACTOR_REQUIRED', true),
    hl7: {
      enabled: bool(env, 'HL7_MLLP_ENABLED', false),
      host: env.HL7_MLLP_HOST || '127.0.0.1',
      port: int(env, 'HL7_MLLP_PORT', 2575, 0),
      // The invented demo hospital's code (Kestrel Vale); a real site sets its own.
      assigningAuthority: env.HL7_ASSIGNING_AUTHORITY || 'KVH',
      retentionDays: int(env, 'HL7_RETENTION_DAYS', 365, 1, 36_500),
      maxMessageBytes: int(env, 'HL7_MAX_MESSAGE_BYTES', 1024 * 1024, 1024, 16 * 1024 * 1024),
      idleTimeoutSeconds: int(env, 'HL7_IDLE_TIMEOUT_SECONDS', 300, 1, 86_400),
      partialTimeoutSeconds: int(env, 'HL7_PARTIAL_TIMEOUT_SECONDS', 30, 1, 3600),
      maxConnections: int(env, 'HL7_MAX_CONNECTIONS', 64, 1, 10_000),
    },
  }
}
