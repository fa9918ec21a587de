/**
 * The one place that reads process.env. Each key names its environment variable; the whole
 * config is checked at boot so a typo fails loudly instead of running with a wrong default.
 */
import path from 'node:path'
import { DEMO_HOSPITAL } from '../seed/demo/hospital'
import { isTimeZone } from '../shared/appointments/time'

export interface Config {
  env: 'production' | 'development' | 'test'
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
    /** COOKIE_SECURE: true behind TLS */ cookieSecure: boolean
  }
  /** TRUST_PROXY: hops of reverse proxy to trust for the client address */ trustProxy: number
  login: {
    /** LOGIN_MAX_FAILURES_ACCOUNT */ maxFailuresPerAccount: number
    /** LOGIN_MAX_FAILURES_ADDRESS */ maxFailuresPerAddress: number
    /** LOGIN_WINDOW_MINUTES */ windowMinutes: number
  }
  smtp: {
    /** SMTP_HOST */ host: string
    /** SMTP_PORT */ port: number
    /** MAIL_FROM */ from: string
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
  }
  /** STATIC_DIR: the built client; empty disables serving it */ staticDir: string
  /** PUBLIC_URL: base of links in e-mails */ publicUrl: string
  /** UPLOAD_DIR: where episode documents and letters are stored, outside the web root */ uploadDir: string
  /** PATIENT_ID_SYSTEM: URI naming the hospital number (MRN) in FHIR exports */ patientIdSystem: string
  hl7: {
    /** HL7_MLLP_ENABLED: listen for HL7 v2 messages over MLLP (npm start turns it on) */ enabled: boolean
    /** HL7_MLLP_HOST */ host: string
    /** HL7_MLLP_PORT: 0 picks a free port (the tests) */ port: number
    /** HL7_ASSIGNING_AUTHORITY: PID-3 assigning authority of the hospital number (MRN) */ assigningAuthority: string
    /** HL7_RETENTION_DAYS: messages older than this are deleted, unless they still need attention */ retentionDays: number
    /** HL7_MAX_MESSAGE_BYTES */ maxMessageBytes: number
    /** HL7_IDLE_TIMEOUT_SECONDS: a connection silent this long is closed */ idleTimeoutSeconds: number
    /** HL7_PARTIAL_TIMEOUT_SECONDS: a message begun but not finished this long is dropped with its connection */ partialTimeoutSeconds: number
    /** HL7_MAX_CONNECTIONS */ maxConnections: number
  }
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

// An invented URI on the reserved .test domain: a real hospital sets its own (often an OID, urn:oid:…).
const DEMO_PATIENT_ID_SYSTEM = 'https://kestrelvale.ferrolane.test/id/hospital-number'

function uri(env: Env, key: string, fallback: string): string {
  const raw = env[key] || fallback
  if (!/^(https?:\/\/[^\s]+|urn:[a-z0-9][a-z0-9-]*:[^\s]+)$/i.test(raw)) throw new Error(`Configuration: ${key} must be an absolute URI (http(s):// or urn:) (got "${raw}")`)
  return raw
}

export function loadConfig(env: Env = process.env): Config {
  const nodeEnv = env.NODE_ENV === 'production' || env.NODE_ENV === 'test' ? env.NODE_ENV : 'development'
  const secret = env.SESSION_SECRET ?? (nodeEnv === 'production' ? '' : 'ferrolane-local-development-secret')
  if (secret.length < 16) throw new Error('Configuration: SESSION_SECRET must be at least 16 characters')
  const port = int(env, 'PORT', 8080, 0)
  return {
    env: nodeEnv,
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
      cookieSecure: bool(env, 'COOKIE_SECURE', false),
    },
    trustProxy: int(env, 'TRUST_PROXY', 0, 0, 10),
    login: {
      maxFailuresPerAccount: int(env, 'LOGIN_MAX_FAILURES_ACCOUNT', 5, 1, 1000),
      maxFailuresPerAddress: int(env, 'LOGIN_MAX_FAILURES_ADDRESS', 30, 1, 10000),
      windowMinutes: int(env, 'LOGIN_WINDOW_MINUTES', 15, 1, 24 * 60),
    },
    smtp: {
      host: env.SMTP_HOST || '127.0.0.1',
      port: int(env, 'SMTP_PORT', 1025, 1),
      from: env.MAIL_FROM || 'Ferrolane anaemia service <no-reply@ferrolane.test>',
    },
    clinic: {
      name: env.CLINIC_NAME || DEMO_HOSPITAL.name,
      service: env.CLINIC_SERVICE || DEMO_HOSPITAL.service,
      phone: env.CLINIC_PHONE || DEMO_HOSPITAL.phone,
      email: env.CLINIC_EMAIL || DEMO_HOSPITAL.email,
      timeZone: timeZone(env, 'CLINIC_TIME_ZONE', DEMO_HOSPITAL.timeZone),
    },
    outbox: {
      pollMs: int(env, 'OUTBOX_POLL_MS', 5000, 100, 3_600_000),
      maxAttempts: int(env, 'OUTBOX_MAX_ATTEMPTS', 8, 1, 100),
      retryBaseSeconds: int(env, 'OUTBOX_RETRY_BASE_SECONDS', 30, 1, 86_400),
      leaseSeconds: int(env, 'OUTBOX_LEASE_SECONDS', 120, 10, 86_400),
      reminderDaysBefore: int(env, 'REMINDER_DAYS_BEFORE', 2, 0, 60),
    },
    replies: {
      maxBadTokensPerAddress: int(env, 'REPLY_MAX_BAD_TOKENS', 10, 1, 10000),
      windowMinutes: int(env, 'REPLY_WINDOW_MINUTES', 15, 1, 24 * 60),
    },
    staticDir: env.STATIC_DIR ?? 'dist',
    publicUrl: (env.PUBLIC_URL || `http://127.0.0.1:${port}`).replace(/\/$/, ''),
    // Resolved once so a later chdir cannot move the store; the start and test scripts point it into their data dir.
    uploadDir: path.resolve(env.UPLOAD_DIR || '.data/uploads'),
    patientIdSystem: uri(env, 'PATIENT_ID_SYSTEM', DEMO_PATIENT_ID_SYSTEM),
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
