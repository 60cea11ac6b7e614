import type { AddressInfo } from 'node:net'
import { SMTPServer, type SMTPServerAddress } from 'smtp-server'
import { db } from '../db'
import { logger } from '../logger'
import type { Conn } from '../repositories/connection'
import { insertReceivedMail } from '../repositories/received-mails.repo'
import { parseMail } from './parse-mail'

export interface FakeSmtpServerOptions {
  /** 0 picks a free port (tests). */
  port: number
  conn?: Conn
}

export interface RunningFakeSmtpServer {
  port: number
  close(): Promise<void>
}

const MAX_MESSAGE_BYTES = 10 * 1024 * 1024

function addressOf(address: SMTPServerAddress | false): string | null {
  return address ? address.address : null
}

/**
 * The local stand-in for a mail server (development and tests): listens on loopback only, accepts
 * every message without TLS or credentials, and keeps it in received_mails for the admin Outbox page.
 */
export async function startFakeSmtpServer(options: FakeSmtpServerOptions): Promise<RunningFakeSmtpServer> {
  const conn = options.conn ?? db
  const server = new SMTPServer({
    disabledCommands: ['STARTTLS'],
    authOptional: true,
    // If SMTP_USER is set while the fake runs, nodemailer still logs in: accept any credentials.
    allowInsecureAuth: true,
    onAuth: (auth, _session, done) => done(null, { user: auth.username ?? 'anyone' }),
    size: MAX_MESSAGE_BYTES,
    logger: false,
    banner: 'Nestwise local mail catcher',
    onData(stream, session, done) {
      const chunks: Buffer[] = []
      stream.on('data', (chunk: Buffer) => chunks.push(chunk))
      stream.on('error', done)
      stream.on('end', () => {
        if ((stream as unknown as { sizeExceeded?: boolean }).sizeExceeded) {
          return done(Object.assign(new Error('Message too large'), { responseCode: 552 }))
        }
        const raw = Buffer.concat(chunks)
        const parsed = parseMail(raw)
        insertReceivedMail(
          {
            envelopeFrom: addressOf(session.envelope.mailFrom),
            envelopeTo: session.envelope.rcptTo.map((r) => r.address),
            messageId: parsed.messageId,
            from: parsed.from,
            to: parsed.to,
            subject: parsed.subject,
            text: parsed.text,
            html: parsed.html,
            raw: raw.toString('utf8'),
          },
          conn,
        ).then(
          () => done(),
          (err: unknown) => {
            logger.error('fake SMTP server could not store a message', { err })
            done(Object.assign(new Error('Could not store the message'), { responseCode: 451 }))
          },
        )
      })
    },
  })
  let listening = false
  // Errors while starting to listen (port taken) are the caller's to handle, not to log.
  server.on('error', (err) => {
    if (listening) logger.error('fake SMTP server error', { err })
  })

  await new Promise<void>((resolve, reject) => {
    const onError = (err: Error) => reject(err)
    server.server.once('error', onError)
    server.listen(options.port, '127.0.0.1', () => {
      server.server.off('error', onError)
      listening = true
      resolve()
    })
  })
  const port = (server.server.address() as AddressInfo).port
  return {
    port,
    close: () => new Promise<void>((resolve) => server.close(() => resolve())),
  }
}
