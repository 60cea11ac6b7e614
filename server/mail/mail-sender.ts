import type { Transporter } from 'nodemailer'
import { db } from '../db'
import { logger } from '../logger'
import type { Conn } from '../repositories/connection'
import { lockNextDueMessage, markOutboxAttemptFailed, markOutboxSent } from '../repositories/mail-outbox.repo'
import { onMailQueued } from './outbox-signal'

export interface MailSenderOptions {
  transport: Pick<Transporter, 'sendMail'>
  from: string
  conn?: Conn
  /** How often to look for due messages when nobody signals (retries become due this way). */
  pollIntervalMs?: number
  /** Attempts before a message is marked failed for good. */
  maxAttempts?: number
  /** Wait before attempt n+1 after n failed attempts. */
  retryDelayMs?: (failedAttempts: number) => number
  /** Messages handled per run at most, so one run cannot starve the process. */
  batchSize?: number
}

export interface MailSender {
  start(): void
  /** Stops polling and waits for a run in progress. */
  stop(): Promise<void>
  /** Sends what is due now; resolves with the number of messages attempted. */
  runOnce(): Promise<number>
}

/** 30 s, 1 min, 2 min … doubling, at most one hour. */
export function defaultRetryDelayMs(failedAttempts: number): number {
  return Math.min(30_000 * 2 ** Math.max(0, failedAttempts - 1), 60 * 60_000)
}

function describe(err: unknown): string {
  if (err instanceof Error) {
    const code = (err as { code?: string; responseCode?: number }).code
    return code ? `${code}: ${err.message}` : err.message
  }
  return String(err)
}

/**
 * The outbox sender: takes one due message at a time with FOR UPDATE SKIP LOCKED, hands it to
 * SMTP and records the outcome in the same transaction. A crash mid-send leaves the row queued
 * (at-least-once delivery). Failures are retried with backoff until maxAttempts.
 */
export function createMailSender(options: MailSenderOptions): MailSender {
  const conn = options.conn ?? db
  const pollIntervalMs = options.pollIntervalMs ?? 5_000
  const maxAttempts = options.maxAttempts ?? 5
  const retryDelayMs = options.retryDelayMs ?? defaultRetryDelayMs
  const batchSize = options.batchSize ?? 20

  let timer: NodeJS.Timeout | undefined
  let unsubscribe: (() => void) | undefined
  let running: Promise<number> | undefined
  let runAgain = false
  let started = false

  async function sendOne(): Promise<boolean> {
    return conn.transaction(async (trx) => {
      const message = await lockNextDueMessage(trx)
      if (!message) return false
      try {
        const info = await options.transport.sendMail({
          from: options.from,
          to: message.to,
          subject: message.subject,
          text: message.text,
          ...(message.html ? { html: message.html } : {}),
        })
        await markOutboxSent(message.id, (info as { messageId?: string }).messageId ?? null, trx)
      } catch (err) {
        const failedAttempts = message.attempts + 1
        const retryAt =
          failedAttempts < maxAttempts ? new Date(Date.now() + retryDelayMs(failedAttempts)) : null
        logger.warn('mail delivery failed', {
          outboxId: message.id,
          attempt: failedAttempts,
          retryAt,
          err: describe(err),
        })
        await markOutboxAttemptFailed(message.id, describe(err), retryAt, trx)
      }
      return true
    })
  }

  async function drain(): Promise<number> {
    let attempted = 0
    do {
      runAgain = false
      while (attempted < batchSize && (await sendOne())) attempted += 1
    } while (runAgain && attempted < batchSize)
    return attempted
  }

  function runOnce(): Promise<number> {
    if (running) {
      runAgain = true
      return running
    }
    running = drain().finally(() => {
      running = undefined
    })
    return running
  }

  function tick(): void {
    runOnce()
      .catch((err: unknown) => logger.error('mail sender run failed', { err }))
      .finally(() => {
        if (started) timer = setTimeout(tick, pollIntervalMs)
      })
  }

  return {
    start() {
      if (started) return
      started = true
      unsubscribe = onMailQueued(() => {
        runOnce().catch((err: unknown) => logger.error('mail sender run failed', { err }))
      })
      tick()
    },
    async stop() {
      started = false
      if (timer) clearTimeout(timer)
      unsubscribe?.()
      await running?.catch(() => undefined)
    },
    runOnce,
  }
}
