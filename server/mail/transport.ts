import nodemailer, { type Transporter } from 'nodemailer'
import type { Config } from '../config'

/**
 * SMTP to the configured relay (maildev locally). Timeouts stay well under the outbox lease,
 * so a send either finishes or fails before another worker may reclaim the message.
 */
export function createMailTransport(smtp: Config['smtp']): Transporter {
  return nodemailer.createTransport({
    host: smtp.host,
    port: smtp.port,
    secure: false,
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 30_000,
  })
}
