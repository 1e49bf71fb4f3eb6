import type { Database } from '../db/client'
import type { Logger } from '../logger'
import { claimDueMail, markFailed, markSent, releaseStaleClaims } from '../repositories/outbox'
import type { MailSender } from './transport'

export interface OutboxWorkerOptions {
  pollMs: number
  batchSize: number
  maxAttempts: number
  /** First retry delay; doubles per attempt up to `maxBackoffMs`. */
  baseBackoffMs: number
  maxBackoffMs: number
}

export const DEFAULT_OUTBOX_OPTIONS: OutboxWorkerOptions = {
  pollMs: 2000,
  batchSize: 20,
  maxAttempts: 8,
  baseBackoffMs: 30_000,
  maxBackoffMs: 60 * 60_000,
}

export function backoffMs(attempts: number, o: Pick<OutboxWorkerOptions, 'baseBackoffMs' | 'maxBackoffMs'>): number {
  return Math.min(o.maxBackoffMs, o.baseBackoffMs * 2 ** Math.max(0, attempts - 1))
}

/** Tries a bookkeeping write a few times (the database may be slow for a moment); throws the last error. */
async function persist(write: () => Promise<void>, tries = 5, pauseMs = 250): Promise<void> {
  for (let i = 1; ; i++) {
    try {
      return await write()
    } catch (err) {
      if (i >= tries) throw err
      await new Promise((r) => setTimeout(r, pauseMs * i))
    }
  }
}

/**
 * Sends one batch of due mail; returns how many were sent. Usable from a script or a test.
 *
 * A message the mail server accepted is never put back in the queue: if recording it as sent fails
 * even after retries, it stays claimed ('sending'), so it is sent again only by the stale-claim
 * release, the same as after a crash. Only a failed send schedules a retry.
 */
export async function drainOnce(
  db: Database,
  sender: MailSender,
  logger: Logger,
  o: OutboxWorkerOptions,
): Promise<number> {
  const batch = await claimDueMail(db, o.batchSize)
  let sent = 0
  for (const m of batch) {
    try {
      await sender.send({ to: m.toAddress, toName: m.toName, subject: m.subject, text: m.textBody, html: m.htmlBody })
    } catch (err) {
      const message = err instanceof Error ? err.message : String(err)
      const retryAt = m.attempts < o.maxAttempts ? new Date(Date.now() + backoffMs(m.attempts, o)) : null
      logger.warn({ mailId: m.id, attempts: m.attempts, retryAt, err: message }, 'mail send failed')
      await persist(() => markFailed(db, m.id, message, retryAt))
      continue
    }
    sent++
    try {
      await persist(() => markSent(db, m.id))
    } catch (err) {
      logger.error({ mailId: m.id, err }, 'mail sent but not recorded as sent; it stays claimed')
    }
  }
  return sent
}

/**
 * The background worker inside each server process. Several processes may run it at once: the
 * claim step's row locks keep them from sending the same message.
 */
export function startOutboxWorker(
  db: Database,
  sender: MailSender,
  logger: Logger,
  o: OutboxWorkerOptions = DEFAULT_OUTBOX_OPTIONS,
) {
  let timer: NodeJS.Timeout | null = null
  let running: Promise<void> | null = null
  let again = false
  let stopped = false

  const tick = async () => {
    try {
      await releaseStaleClaims(db, 10 * 60_000)
      // Keep draining while full batches come back.
      while (!stopped && (await drainOnce(db, sender, logger, o)) >= o.batchSize) {
        /* next batch */
      }
    } catch (err) {
      logger.warn({ err }, 'outbox worker cycle failed; will retry')
    }
  }
  /** Runs a cycle unless one is running; a request made during a cycle runs one more after it. */
  const run = (): Promise<void> => {
    if (stopped) return Promise.resolve()
    if (running) {
      again = true
      return running
    }
    running = tick().finally(() => {
      running = null
      if (again && !stopped) {
        again = false
        void run()
      }
    })
    return running
  }
  const schedule = () => {
    if (stopped) return
    timer = setTimeout(() => void run().finally(schedule), o.pollMs)
  }
  schedule()
  return {
    /** Runs a cycle now (used after a publish so mail does not wait for the next poll). */
    kick: () => void run(),
    stop: async () => {
      stopped = true
      if (timer) clearTimeout(timer)
      await running
      sender.close()
    },
  }
}
