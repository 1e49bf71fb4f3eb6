import type { Server } from 'node:http'
import { createApp, gradingContext } from './app'
import { ConfigError, appDbOptions, gradingBudget, loadConfig } from './config'
import { createDb } from './db/client'
import { createLogger } from './logger'
import { DEFAULT_OUTBOX_OPTIONS, startOutboxWorker } from './mail/outbox-worker'
import { createSmtpSender } from './mail/transport'
import { queueFlagDigests } from './services/flag-digest'
import { queueStandReminders } from './services/stand-reminders'
import { createGrader } from './grading/grading-pool'
import { startGradingWorker } from './grading/grading-worker'

// Entry point: read configuration, listen, and shut down cleanly on SIGINT/SIGTERM.
let config
try {
  config = loadConfig()
} catch (err) {
  if (err instanceof ConfigError) {
    process.stderr.write(`${err.message}\n`)
    process.exit(78) // EX_CONFIG
  }
  throw err
}

const logger = createLogger(config.LOG_LEVEL)
const dbHandle = createDb(appDbOptions(config))
const worker =
  config.MAIL_POLL_MS > 0
    ? startOutboxWorker(dbHandle.db, createSmtpSender(config), logger, {
        ...DEFAULT_OUTBOX_OPTIONS,
        pollMs: config.MAIL_POLL_MS,
      })
    : null
// The flag digest runs on a timer in every process; SKIP LOCKED keeps replicas from doubling it.
const digestTimer =
  config.FLAG_DIGEST_MINUTES > 0
    ? setInterval(() => {
        queueFlagDigests(dbHandle.db, config.APP_URL)
          .then((n) => {
            if (n > 0) {
              logger.info({ digests: n }, 'flag digests queued')
              worker?.kick()
            }
          })
          .catch((err: unknown) => logger.warn({ err }, 'flag digest failed; will retry'))
      }, config.FLAG_DIGEST_MINUTES * 60_000)
    : null
// Day-before stand reminders, on a timer in every process too: the outbox's dedupe key keeps each
// reminder to one message however many processes and runs find it.
const reminderTimer =
  config.STAND_REMINDER_MINUTES > 0
    ? setInterval(() => {
        queueStandReminders(dbHandle.db, config.APP_URL)
          .then((n) => {
            if (n > 0) worker?.kick()
          })
          .catch((err: unknown) => logger.warn({ err }, 'stand reminders failed; will retry'))
      }, config.STAND_REMINDER_MINUTES * 60_000)
    : null
const grader = createGrader(gradingBudget(config))
// Load the grading threads now so the first hand-in does not wait for them.
grader.warmUp().catch((err: unknown) => logger.error({ err }, 'grading threads failed to start'))
const gradingWorker =
  config.GRADING_POLL_MS > 0
    ? startGradingWorker(
        dbHandle.db,
        gradingContext(dbHandle.db, { grader, logger, appUrl: config.APP_URL, onMailQueued: () => worker?.kick() }),
        {
          pollMs: config.GRADING_POLL_MS,
          batchSize: 4 * config.GRADING_THREADS,
          staleMs: config.GRADING_STALE_SECONDS * 1000,
        },
      )
    : null
const { app, close } = createApp({
  config,
  db: dbHandle.db,
  logger,
  grader,
  onMailQueued: () => worker?.kick(),
  onHandInStored: () => gradingWorker?.kick(),
})

const server: Server = app.listen(config.PORT, config.HOST, () => {
  logger.info({ url: `http://${config.HOST}:${config.PORT}`, appUrl: config.APP_URL }, 'Isentrope is listening')
})

let stopping = false
async function shutdown(signal: string): Promise<void> {
  if (stopping) return
  stopping = true
  logger.info({ signal }, 'shutting down')
  server.close()
  server.closeAllConnections()
  if (digestTimer) clearInterval(digestTimer)
  if (reminderTimer) clearInterval(reminderTimer)
  await gradingWorker?.stop().catch((err: unknown) => logger.warn({ err }, 'grading worker stop failed'))
  await grader.close().catch((err: unknown) => logger.warn({ err }, 'grading threads close failed'))
  await worker?.stop().catch((err: unknown) => logger.warn({ err }, 'outbox worker stop failed'))
  await close().catch((err: unknown) => logger.warn({ err }, 'session store close failed'))
  await dbHandle.close().catch((err: unknown) => logger.warn({ err }, 'database pool close failed'))
  process.exit(0)
}
process.on('SIGINT', () => void shutdown('SIGINT'))
process.on('SIGTERM', () => void shutdown('SIGTERM'))
