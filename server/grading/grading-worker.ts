import type { Database } from '../db/client'
import type { GradingContext } from '../services/grading-service'
import { gradeWaiting } from '../services/grading-service'

export interface GradingWorkerOptions {
  /** How often the queue is looked at when nothing kicks the worker. */
  pollMs: number
  /** Jobs claimed per cycle (the grading threads take them in turn). */
  batchSize: number
  /** A claim older than this is taken to belong to a worker that died. */
  staleMs: number
}

export const DEFAULT_GRADING_WORKER_OPTIONS: GradingWorkerOptions = { pollMs: 2000, batchSize: 8, staleMs: 120_000 }

/**
 * The background grader inside each server process. It grades what the hand-in requests did not
 * (a database hiccup, a restart, a burst), so no acknowledged hand-in is left ungraded. Several
 * processes may run it at once: claims use SKIP LOCKED and a token.
 */
export function startGradingWorker(
  db: Database,
  ctx: GradingContext,
  o: GradingWorkerOptions = DEFAULT_GRADING_WORKER_OPTIONS,
) {
  let timer: NodeJS.Timeout | null = null
  let running: Promise<void> | null = null
  let again = false
  let stopped = false

  const tick = async () => {
    do {
      again = false
      try {
        // Keep going while full batches come back.
        while (!stopped && (await gradeWaiting(db, ctx, o.batchSize, o.staleMs)) >= o.batchSize) {
          /* next batch */
        }
      } catch (err) {
        ctx.logger.warn({ err }, 'grading worker cycle failed; will retry')
      }
    } while (again && !stopped)
  }
  const run = () => {
    if (running) {
      again = true
      return
    }
    running = tick().finally(() => {
      running = null
      schedule()
    })
  }
  const schedule = () => {
    if (stopped) return
    if (timer) clearTimeout(timer)
    timer = setTimeout(run, o.pollMs)
  }
  schedule()
  return {
    /** Looks at the queue now (after a hand-in was stored, or the database came back). */
    kick: () => {
      if (!stopped) run()
    },
    stop: async () => {
      stopped = true
      if (timer) clearTimeout(timer)
      await running
    },
  }
}
