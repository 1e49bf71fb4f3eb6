import { Piscina } from 'piscina'
import type { GradeInput, GradeResult } from '../../shared/grading/grade'

export interface GradingBudget {
  /** Wall-clock limit for one hand-in's grading, in ms; the worker thread is ended past it. */
  timeoutMs: number
  /** Heap limit of each grading thread, in MB (worker_threads resourceLimits). */
  memoryMb: number
  /** Grading threads kept (each holds its own copy of the formula and expression libraries). */
  threads: number
}

export const DEFAULT_GRADING_BUDGET: GradingBudget = { timeoutMs: 20_000, memoryMb: 512, threads: 1 }

/**
 * Why grading did not produce a result when the cause is the budget, not the data: the grading
 * thread ran past its time or memory limit. Permanent (a retry would do the same).
 */
export class GradingBudgetError extends Error {
  constructor(
    readonly kind: 'time' | 'memory',
    message: string,
  ) {
    super(message)
    this.name = 'GradingBudgetError'
  }
}

export interface Grader {
  grade(input: GradeInput): Promise<GradeResult>
  /** True when a thread is free now (a hand-in request then grades at once instead of queueing). */
  idle(): boolean
  /** Starts the threads now, so the first hand-in does not wait for them to load. */
  warmUp(): Promise<void>
  close(): Promise<void>
}

/**
 * Grades in worker threads, so a module's expressions over a large log can never stall the
 * server's event loop, each job under a time and memory budget. The pool is created on first use.
 * https://github.com/piscinajs/piscina#constructor-new-piscinaoptions
 */
export function createGrader(budget: GradingBudget = DEFAULT_GRADING_BUDGET): Grader {
  let pool: Piscina | null = null
  // One job per thread at a time, taken in order: the time budget then counts the job's own run,
  // not its wait in a queue behind a burst of others.
  let free = budget.threads
  const waiting: (() => void)[] = []
  const acquire = () => (free > 0 ? (free--, Promise.resolve()) : new Promise<void>((r) => waiting.push(r)))
  const release = () => {
    const next = waiting.shift()
    if (next) next()
    else free++
  }
  const getPool = () =>
    (pool ??= new Piscina({
      filename: new URL('./grade-task.mjs', import.meta.url).href,
      minThreads: budget.threads,
      maxThreads: budget.threads,
      // Keep threads loaded between hand-ins; loading the libraries takes a second or more.
      idleTimeout: 10 * 60_000,
      resourceLimits: {
        maxOldGenerationSizeMb: budget.memoryMb,
        maxYoungGenerationSizeMb: Math.min(64, budget.memoryMb / 4),
      },
    }))
  return {
    async grade(input) {
      await acquire()
      let signal: AbortSignal | null = null
      try {
        // A thread that replaced one stopped for its budget loads its libraries first (a second or
        // more), outside the job's budget.
        await getPool().run(null, { name: 'ping' })
        signal = AbortSignal.timeout(budget.timeoutMs)
        return (await getPool().run(input, { signal })) as GradeResult
      } catch (err) {
        const e = err as { name?: string; code?: string; message?: string }
        if (signal?.aborted) {
          throw new GradingBudgetError('time', `grading ran past its ${budget.timeoutMs} ms budget and was stopped`)
        }
        if (e.code === 'ERR_WORKER_OUT_OF_MEMORY' || /out of memory|heap limit/i.test(e.message ?? '')) {
          throw new GradingBudgetError(
            'memory',
            `grading ran past its ${budget.memoryMb} MB memory budget and was stopped`,
          )
        }
        throw err
      } finally {
        release()
      }
    },
    idle: () => free > 0,
    async warmUp() {
      const p = getPool()
      // Piscina starts minThreads at once; wait until one of them has loaded its module.
      await p.run(null, { name: 'ping' })
    },
    async close() {
      if (pool) await pool.destroy()
      pool = null
    },
  }
}
