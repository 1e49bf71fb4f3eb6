import { measureJet } from '../../shared/images/jet-marks'
import { findIdenticalPhotos, listImages } from '../repositories/submission-images'
import type { ImageMeasures } from '../../shared/modules/scope'
import { logFingerprint, nearCopy, nearCopyMessage } from '../../shared/grading/fingerprint'
import type { LogFingerprint, NearCopy } from '../../shared/grading/fingerprint'
import type { GradeInput, GradeResult } from '../../shared/grading/grade'
import type { ModuleFrontMatter, TableSpec } from '../../shared/modules/schema'
import { valueToSI } from '../../shared/modules/quantities'
import { GRADING_FAILED_MESSAGE } from '../../shared/schemas/submissions'
import { toSpecUnit } from '../../shared/typed-values'
import type { Database } from '../db/client'
import type { SubmissionInputs } from '../db/schema'
import { retryOnLockConflict } from '../db/retry'
import type { Grader } from '../grading/grading-pool'
import { GradingBudgetError } from '../grading/grading-pool'
import type { Logger } from '../logger'
import { claimGradingJobs, releaseStaleGradingClaims, requeueGradingJob } from '../repositories/grading-jobs'
import type { GradingClaim } from '../repositories/grading-jobs'
import { findVersion } from '../repositories/modules'
import type { CheckWrite, FlagWrite } from '../repositories/submissions'
import {
  findFingerprintsInModule,
  findIdenticalFiles,
  findParsedColumns,
  findSubmissionById,
  listFiles,
  saveGrade,
  setFingerprint,
} from '../repositories/submissions'
import { enqueueMail } from '../repositories/outbox'
import type { NewMail } from '../repositories/outbox'
import { readingSense } from './hand-in-validation'
import type { PressureSense } from '../../shared/units'

/** How many times a hand-in is claimed before its grading is given up as failed. */
export const MAX_GRADE_ATTEMPTS = 6

export interface GradingContext {
  grader: Grader
  logger: Logger
  /** The receipt e-mails for a hand-in with this outcome; queued in the grade's own transaction. */
  receipt?: (submissionId: number, outcome: GradeOutcome) => Promise<NewMail[]>
  /** Called after mail was queued, so the outbox worker sends it without waiting. */
  onMailQueued?: () => void
}

export interface GradeOutcome {
  status: 'graded' | 'grading-failed'
  score: number | null
  maxScore: number | null
}

export type JobOutcome = 'graded' | 'failed' | 'requeued' | 'superseded'

/**
 * The stored hand-in as the grading engine's input: the SI values are derived again from what
 * the student typed and the parsed columns, the same conversion as at hand-in.
 */
export function gradingInputOf(
  fm: ModuleFrontMatter,
  inputs: SubmissionInputs,
  files: {
    tableKey: string
    parsed: Record<string, number[]>
    mapping: Record<string, { pressure?: PressureSense }>
  }[],
  latePenalty: number,
): GradeInput {
  const a = fm.assignment
  if (!a) throw new Error('the module version has no assignment')
  const measurements: Record<string, number> = {}
  const pressures: Record<string, PressureSense> = {}
  for (const m of a.measurements) {
    const t = inputs.measurements[m.key]
    if (!t) continue
    measurements[m.key] = valueToSI(t.value, t.unit)
    const sense = readingSense(m, t)
    if (m.pressure && sense && sense !== m.pressure) pressures[m.key] = sense
  }
  const tables: Record<string, Record<string, number[]>> = {}
  for (const t of a.tables) {
    const f = files.find((x) => x.tableKey === t.key)
    if (!f) continue
    tables[t.key] = f.parsed
    for (const c of t.columns) {
      const sense = f.mapping[c.key]?.pressure
      if (c.pressure && sense && sense !== c.pressure) pressures[c.key] = sense
    }
  }
  const reported: Record<string, number> = {}
  for (const r of a.results) {
    const t = inputs.reported[r.key]
    if (t) reported[r.key] = toSpecUnit(t.value, t.unit, r.unit)
  }
  // Each photograph's distances, measured again from the stored marks the same way the pages do.
  const images: Record<string, ImageMeasures> = {}
  for (const img of a.images) {
    const marks = inputs.images?.[img.key]
    if (!marks) continue
    const m = measureJet(marks)
    images[img.key] = { cellSpacing: m.meanCellSpacing, machDisk: m.machDiskDistance, cellCount: marks.cellEnds.length }
  }
  return { assignment: a, data: { tables, measurements, pressures, images }, reported, latePenalty }
}

function checkWrites(result: GradeResult): CheckWrite[] {
  return result.checks.map((c) => ({
    resultKey: c.key,
    label: c.label,
    unit: c.unit,
    reported: c.reported,
    expected: c.expected ?? null,
    absError: c.absError ?? null,
    relError: c.relError ?? null,
    tolerance: c.tolerance ?? null,
    standardUncertainty: c.uncertainty?.standard ?? null,
    coverageFactor: c.uncertainty?.coverage ?? null,
    uncertaintyContributions: c.uncertainty?.contributions ?? null,
    pointsPossible: c.pointsPossible,
    pointsAwarded: c.pointsAwarded,
    pass: c.pass,
    outcome: c.outcome,
    error: c.error ?? null,
  }))
}

/**
 * Writes the outcome in one transaction: the grade (or the failure), its flags, and the receipt.
 * Nothing of it is written when the claim no longer holds the job.
 */
async function saveOutcome(
  db: Database,
  ctx: GradingContext,
  claim: GradingClaim,
  grade: {
    gradingError: string | null
    rawScore: number | null
    score: number | null
    maxScore: number | null
    status: 'graded' | 'grading-failed'
  },
  checks: CheckWrite[],
  flags: FlagWrite[],
): Promise<boolean> {
  const mails = ctx.receipt
    ? await ctx.receipt(claim.submissionId, { status: grade.status, score: grade.score, maxScore: grade.maxScore })
    : []
  const saved = await retryOnLockConflict(() =>
    db.transaction(async (tx) => {
      if (!(await saveGrade(tx, claim, grade, checks, flags))) return false
      await enqueueMail(tx, mails)
      return true
    }),
  )
  if (saved && mails.length) ctx.onMailQueued?.()
  return saved
}

/** Records a hand-in as not gradable automatically: the cause stays in the log and in grading_error. */
function saveFailure(db: Database, ctx: GradingContext, claim: GradingClaim, cause: string): Promise<boolean> {
  return saveOutcome(
    db,
    ctx,
    claim,
    { status: 'grading-failed', gradingError: cause.slice(0, 1000), rawScore: null, score: null, maxScore: null },
    [],
    [{ code: 'grading-failed', message: GRADING_FAILED_MESSAGE, detail: null }],
  )
}

/**
 * Grades one claimed hand-in from its stored data. Problems with the data or the module
 * (including the time and memory budget) end the job as 'grading-failed' for staff; problems
 * with the database are thrown, and the caller puts the job back in the queue.
 */
export async function runGradingJob(db: Database, ctx: GradingContext, claim: GradingClaim): Promise<JobOutcome> {
  const s = await findSubmissionById(db, claim.submissionId)
  if (!s) return 'superseded'
  const log = ctx.logger.child({ submissionId: s.id, gradeAttempt: claim.token })
  if (claim.token > MAX_GRADE_ATTEMPTS) {
    log.error('grading given up after repeated attempts')
    return (await saveFailure(db, ctx, claim, `given up after ${claim.token - 1} attempts`)) ? 'failed' : 'superseded'
  }
  const version = await findVersion(db, s.moduleVersionId)
  const fm = version?.frontMatter as unknown as ModuleFrontMatter | null
  let result: GradeResult
  try {
    if (!fm) throw new Error('the module version has no front matter')
    const files = await listFiles(db, s.id)
    const input = gradingInputOf(fm, s.inputs, files, s.latePenalty)
    result = await ctx.grader.grade(input)
  } catch (err) {
    if (!(err instanceof GradingBudgetError) && isDatabaseError(err)) throw err
    log.error({ err }, 'automatic grading failed')
    const cause = err instanceof Error ? `${err.name}: ${err.message}` : String(err)
    return (await saveFailure(db, ctx, claim, cause)) ? 'failed' : 'superseded'
  }
  const flags: FlagWrite[] = [
    ...result.flags.map((f) => ({ code: f.code, message: f.message, detail: f.detail ?? null })),
    ...(await copyFlags(db, s, fm)),
  ]
  const grade = {
    status: 'graded' as const,
    gradingError: null,
    rawScore: result.rawScore,
    score: result.score,
    maxScore: result.maxScore,
  }
  return (await saveOutcome(db, ctx, claim, grade, checkWrites(result), flags)) ? 'graded' : 'superseded'
}

/**
 * A file byte-identical to another person's or group's in this course is for staff to look at;
 * so is a near-copy of another's log of the same module (an edited digit, shifted time, other
 * units: see shared/grading/fingerprint.ts), found by comparing the logs' stored fingerprints.
 * Read before the grade is written, and written with it.
 */
async function copyFlags(
  db: Database,
  s: { id: number; courseId: number; moduleId: number; userId: number; labGroupId: number | null },
  fm: ModuleFrontMatter | null,
): Promise<FlagWrite[]> {
  const flags: FlagWrite[] = []
  const owner = { userId: s.userId, labGroupId: s.labGroupId }
  for (const f of await listFiles(db, s.id)) {
    const same = await findIdenticalFiles(db, s.courseId, f.sha256, owner)
    if (same.length) {
      const who = same.map((x) => x.labGroupName ?? x.submittedBy).join(', ')
      flags.push({
        code: 'identical-file',
        message: `The uploaded file ${f.filename} is byte-for-byte identical to a file handed in by ${who}.`,
        detail: { otherSubmissionId: same[0]!.submissionId },
      })
      continue
    }
    const table = fm?.assignment?.tables.find((t) => t.key === f.tableKey)
    if (!table) continue
    const mine = f.fingerprint ?? logFingerprint(table, f.parsed)
    if (!mine) continue
    const others = await findFingerprintsInModule(db, s.moduleId, f.tableKey, owner)
    const copied: { who: string; submissionId: number; match: NearCopy }[] = []
    for (const o of others) {
      if (o.sha256 === f.sha256) continue
      const theirs = o.fingerprint ?? (await backfillFingerprint(db, o.fileId, table))
      const match = theirs && nearCopy(mine, theirs)
      if (match) copied.push({ who: o.labGroupName ?? o.submittedBy, submissionId: o.submissionId, match })
    }
    const first = copied[0]
    if (!first) continue
    const who = [...new Set(copied.map((c) => c.who))].join(', ')
    flags.push({
      code: 'near-copy',
      message: nearCopyMessage(f.filename, who, first.match),
      detail: {
        otherSubmissionId: first.submissionId,
        columns: first.match.columns.map((c) => `${c.key} (${c.how})`).join(', '),
      },
    })
  }
  for (const image of await listImages(db, s.id)) {
    const same = await findIdenticalPhotos(db, s.courseId, image.originalSha256, owner)
    if (!same.length) continue
    const label = fm?.assignment?.images.find((i) => i.key === image.imageKey)?.label ?? image.imageKey
    const who = [...new Set(same.map((x) => x.labGroupName ?? x.submittedBy))].join(', ')
    flags.push({
      code: 'identical-file',
      message: `The photograph "${label}" is byte-for-byte the same file as a photograph handed in by ${who}.`,
      detail: { otherSubmissionId: same[0]!.submissionId },
    })
  }
  return flags
}

/** The fingerprint of a file stored before fingerprints existed, computed once and kept. */
async function backfillFingerprint(db: Database, fileId: number, table: TableSpec): Promise<LogFingerprint | null> {
  const parsed = await findParsedColumns(db, fileId)
  const fp = parsed ? logFingerprint(table, parsed) : null
  if (fp) await setFingerprint(db, fileId, fp)
  return fp
}

/** Errors that come from the database (or the way to it), as opposed to the data being graded. */
function isDatabaseError(err: unknown): boolean {
  let e: unknown = err
  for (let depth = 0; e && depth < 5; depth++) {
    const o = e as { code?: unknown; errno?: unknown; sqlMessage?: unknown; cause?: unknown; query?: unknown }
    if (typeof o.errno === 'number' || typeof o.sqlMessage === 'string' || typeof o.query === 'string') return true
    if (typeof o.code === 'string' && /^(E[A-Z]+|PROTOCOL_|ER_|POOL_)/.test(o.code)) return true
    e = o.cause
  }
  return false
}

/** Back-off before a job that failed for a passing reason is tried again: 2 s, 4 s, … up to a minute. */
export function gradingBackoffMs(token: number): number {
  return Math.min(60_000, 1000 * 2 ** Math.max(1, token))
}

/**
 * Runs a claimed job; a database failure puts it back in the queue with a back-off (and if even
 * that fails, the stale-claim release returns it later).
 */
export async function runClaimed(db: Database, ctx: GradingContext, claim: GradingClaim): Promise<JobOutcome> {
  try {
    return await runGradingJob(db, ctx, claim)
  } catch (err) {
    ctx.logger.warn({ err, submissionId: claim.submissionId }, 'grading interrupted by a database error; queued again')
    await requeueGradingJob(db, claim, new Date(Date.now() + gradingBackoffMs(claim.token))).catch(() => undefined)
    return 'requeued'
  }
}

/** Grades one hand-in now if it is waiting (the hand-in request's own fast path). */
export async function gradeNow(db: Database, ctx: GradingContext, submissionId: number): Promise<JobOutcome | null> {
  const [claim] = await claimGradingJobs(db, 1, submissionId)
  return claim ? runClaimed(db, ctx, claim) : null
}

/** One cycle of the background worker: stale claims back to the queue, then up to `limit` jobs. */
export async function gradeWaiting(db: Database, ctx: GradingContext, limit: number, staleMs: number): Promise<number> {
  const released = await releaseStaleGradingClaims(db, staleMs)
  if (released) ctx.logger.warn({ released }, 'grading claims released after going stale')
  const claims = await claimGradingJobs(db, limit)
  await Promise.all(claims.map((c) => runClaimed(db, ctx, c)))
  return claims.length
}
