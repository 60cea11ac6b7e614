import { logger } from '../logger'
import { startFakeSmtpServer, type RunningFakeSmtpServer } from './fake-smtp-server'
import { createMailSender } from './mail-sender'
import { mailSettings, type MailSettings } from './mail-settings'
import { createMailTransport } from './transport'

export interface MailRuntime {
  stop(): Promise<void>
}

/**
 * Prefers SMTP_PORT; when another process holds it (a second checkout, the e2e server next to
 * `npm start`), takes a free port instead, so our mail never lands in someone else's catcher.
 */
async function startOwnFakeSmtp(preferredPort: number): Promise<RunningFakeSmtpServer> {
  try {
    return await startFakeSmtpServer({ port: preferredPort })
  } catch (err) {
    if ((err as NodeJS.ErrnoException).code !== 'EADDRINUSE') throw err
    logger.warn(`SMTP port ${preferredPort} is taken; the local fake SMTP server uses a free port instead`)
    return startFakeSmtpServer({ port: 0 })
  }
}

/**
 * What the server process runs for mail: in fake mode the local SMTP server on loopback, and in
 * every mode the outbox sender. Delivery problems never stop the app: messages wait in the outbox
 * and are retried with backoff.
 */
export async function startMailRuntime(settings: MailSettings = mailSettings()): Promise<MailRuntime> {
  let fake: RunningFakeSmtpServer | undefined
  if (settings.mode === 'fake') {
    fake = await startOwnFakeSmtp(settings.port)
    logger.info(`local fake SMTP server on 127.0.0.1:${fake.port} (admins read its mail in Outbox)`)
  }
  const transport = createMailTransport({ ...settings, port: fake?.port ?? settings.port })
  const sender = createMailSender({ transport, from: settings.from })
  sender.start()
  return {
    async stop() {
      await sender.stop()
      await fake?.close()
    },
  }
}
