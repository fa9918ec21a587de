import { readFileSync } from 'node:fs'
import nodemailer, { type Transporter } from 'nodemailer'
import type { Config } from '../config'

/**
 * The TLS options of the SMTP connection, from configuration: `requireTLS` refuses to send over a
 * relay that does not upgrade with STARTTLS (ASVS 9.2.1), and the relay's certificate is checked
 * unless an operator turns that off; a hospital's own certificate authority can be named.
 */
export function smtpTlsOptions(smtp: Config['smtp']) {
  return {
    requireTLS: smtp.requireTls,
    tls: {
      rejectUnauthorized: smtp.tlsRejectUnauthorized,
      minVersion: 'TLSv1.2' as const,
      ...(smtp.tlsCaFile ? { ca: readFileSync(smtp.tlsCaFile, 'utf8') } : {}),
      ...(smtp.tlsServername ? { servername: smtp.tlsServername } : {}),
    },
  }
}

/**
 * The longest one send can take with the timeouts below (connect, greeting, then the socket idle
 * limit): the outbox starts a send only while its claim has this much left, plus its retry time.
 */
export const SMTP_SEND_BUDGET_MS = 50_000

/**
 * SMTP to the configured relay (maildev locally). Timeouts stay well under the outbox lease,
 * so a send either finishes or fails before another worker may reclaim the message.
 */
export function createMailTransport(smtp: Config['smtp']): Transporter {
  return nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: false,
    ...smtpTlsOptions(smtp),
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  })
}
