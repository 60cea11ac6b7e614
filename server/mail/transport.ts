import nodemailer, { type Transporter } from 'nodemailer'
import type { MailSettings } from './mail-settings'

/**
 * The nodemailer transport for the configured server. Port 465 speaks TLS from the start; other
 * ports upgrade with STARTTLS when the server offers it (the local fake does not).
 */
export function createMailTransport(
  settings: Pick<MailSettings, 'mode' | 'host' | 'port' | 'user' | 'password'>,
): Transporter {
  return nodemailer.createTransport({
    host: settings.host,
    port: settings.port,
    secure: settings.port === 465,
    ignoreTLS: settings.mode === 'fake',
    auth: settings.user ? { user: settings.user, pass: settings.password ?? '' } : undefined,
    // A stuck server must not hold an outbox row (and its transaction) for long.
    connectionTimeout: 10_000,
    greetingTimeout: 10_000,
    socketTimeout: 20_000,
  })
}
