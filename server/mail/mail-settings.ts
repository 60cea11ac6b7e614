import { config } from '../config'

export interface MailSettings {
  /** fake: deliver to the SMTP server this process runs on loopback; smtp: a real server. */
  mode: 'fake' | 'smtp'
  host: string
  port: number
  user?: string
  password?: string
  from: string
}

export function mailSettings(): MailSettings {
  const mode = config.MAIL_MODE ?? (config.NODE_ENV === 'production' ? 'smtp' : 'fake')
  return {
    mode,
    host: mode === 'fake' ? '127.0.0.1' : config.SMTP_HOST,
    port: config.SMTP_PORT,
    user: config.SMTP_USER,
    password: config.SMTP_PASSWORD,
    from: config.MAIL_FROM,
  }
}
