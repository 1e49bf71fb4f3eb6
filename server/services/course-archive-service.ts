/**
 * The end-of-term archive of a course: one zip with the roster, the gradebook, every hand-in with
 * its raw files, photographs (as stored), parsed values, checks, flags, staff changes to points, comments and re-check
 * requests (each as JSON lines and CSV), and every feedback report that can be made; `manifest.json`,
 * written last, lists every other entry with its size and sha256 and the counts of what was written.
 *
 * Streamed: each entry is written into the zip stream as it is read, page by page from the database
 * (repositories/course-archive.ts), and the next entry is started only once the previous one is in
 * the zip, so memory holds one page of rows, one raw file or one report at a time.
 */
import { createHash } from 'node:crypto'
import { PassThrough } from 'node:stream'
import type { Readable } from 'node:stream'
import { ZipArchive } from 'archiver'
import Papa from 'papaparse'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import {
  pageChecks,
  pageComments,
  pageFiles,
  pagePhotos,
  photoBytes,
  pageFlags,
  pageGradeChanges,
  pageParsedValues,
  pageGradedSubmissionIds,
  pageRechecks,
  pageSubmissions,
  fileBytes,
} from '../repositories/course-archive'
import type { CourseEnrollment } from '../repositories/enrollments'
import { listRoster } from '../repositories/enrollments'
import { courseHeader } from '../repositories/reports'
import { fileSlug } from '../reports/format'
import { gradebookCsv, neutraliseCell } from './gradebook-csv'
import { feedbackReportPdf } from './report-service'

export interface ArchiveManifestEntry {
  path: string
  size: number
  sha256: string
}

export interface ArchiveManifest {
  course: { id: number; code: string; title: string; term: string; institution: string }
  generatedAt: string
  counts: {
    rosterEntries: number
    handIns: number
    files: number
    photos: number
    checks: number
    flags: number
    staffChanges: number
    comments: number
    recheckRequests: number
    feedbackReports: number
  }
  /** Graded hand-ins without a report, with the reason (e.g. results not shown yet). */
  reportsNotMade: { submissionId: number; reason: string }[]
  /** Every entry of the zip but this manifest. */
  files: ArchiveManifestEntry[]
}

type Put = (chunk: string | Buffer) => Promise<void>
type Row = Record<string, unknown>

/** A cell as text: dates in ISO form, objects as JSON, text neutralised against spreadsheet formulas. */
function csvCell(v: unknown): string | number | boolean {
  if (v === null || v === undefined) return ''
  if (v instanceof Date) return v.toISOString()
  if (typeof v === 'number' || typeof v === 'boolean') return v
  if (typeof v === 'object') return neutraliseCell(JSON.stringify(v))
  return neutraliseCell(String(v))
}

const jsonLine = (r: Row) => JSON.stringify(r) + '\n'

/**
 * A zip of the whole course, as a stream. The caller's right to it is checked by the route guard
 * (the course's instructor or a site administrator); the course is checked here before anything is
 * written, so that error reaches the caller as an ordinary error.
 *
 * @throws AppError 404 when the course does not exist
 */
export async function courseArchiveZip(
  db: Database,
  e: CourseEnrollment,
  now = new Date(),
): Promise<{ filename: string; stream: Readable }> {
  const course = await courseHeader(db, e.courseId)
  if (!course) throw notFound('That course')
  const courseId = e.courseId

  // https://www.archiverjs.com/docs/archiver (version 8: one class per format)
  const zip = new ZipArchive({ zlib: { level: 6 } })
  const out = new PassThrough()
  zip.on('warning', (err) => out.destroy(err))
  zip.on('error', (err) => out.destroy(err))
  zip.pipe(out)

  const entries: ArchiveManifestEntry[] = []
  const stopped = () => out.destroyed

  /** Settles when `name` is in the zip stream, or when the download was abandoned. */
  const entryDone = (name: string) =>
    new Promise<void>((resolve) => {
      const onEntry = (data: { name: string }) => {
        if (data.name === name) done()
      }
      const done = () => {
        zip.off('entry', onEntry)
        out.off('close', done)
        resolve()
      }
      zip.on('entry', onEntry)
      out.on('close', done)
    })

  /** One zip entry, written by `produce` chunk by chunk, hashed and measured on the way. */
  const addEntry = async (name: string, produce: (put: Put) => Promise<void>) => {
    if (stopped()) throw new Error('archive download abandoned')
    const body = new PassThrough()
    const hash = createHash('sha256')
    let size = 0
    const finished = entryDone(name)
    zip.append(body, { name, date: now })
    const put: Put = async (chunk) => {
      if (stopped()) throw new Error('archive download abandoned')
      const b = typeof chunk === 'string' ? Buffer.from(chunk, 'utf8') : chunk
      hash.update(b)
      size += b.length
      if (!body.write(b)) {
        // Wait until the zip has taken in what it has (or the download was abandoned).
        await new Promise<void>((resolve) => {
          const go = () => {
            body.off('drain', go)
            out.off('close', go)
            resolve()
          }
          body.on('drain', go)
          out.on('close', go)
        })
      }
    }
    await produce(put)
    body.end()
    await finished
    entries.push({ path: name, size, sha256: hash.digest('hex') })
  }

  /**
   * The same rows as JSON lines and as CSV, read in pages; returns how many rows. The CSV's columns
   * are the first row's keys (every row of a page reader has the same keys).
   */
  const addTable = async (
    base: string,
    page: (afterId: number) => Promise<(Row & { id: number })[]>,
    csvRow: (r: Row) => Row = (r) => r,
  ): Promise<number> => {
    let rows = 0
    await addEntry(`${base}.jsonl`, async (put) => {
      for (let after = 0; ;) {
        const batch = await page(after)
        if (batch.length === 0) break
        await put(batch.map(jsonLine).join(''))
        rows += batch.length
        after = batch[batch.length - 1]!.id
      }
    })
    await addEntry(`${base}.csv`, async (put) => {
      let fields: string[] | null = null
      for (let after = 0; ;) {
        const batch = await page(after)
        if (batch.length === 0) break
        const shaped = batch.map(csvRow)
        const header: string[] = fields ?? Object.keys(shaped[0]!)
        const data = shaped.map((r) => header.map((k) => csvCell(r[k])))
        // The byte-order mark lets spreadsheet programs read names with accents as UTF-8.
        const text = Papa.unparse({ fields: header, data }, { newline: '\r\n', header: fields === null })
        await put((fields === null ? '\uFEFF' : '\r\n') + text)
        fields = header
        after = batch[batch.length - 1]!.id
      }
      if (fields === null) await put('\uFEFF')
    })
    return rows
  }

  const write = async (): Promise<void> => {
    const roster = await listRoster(db, courseId)
    // The roster is one query: a course's roster is bounded (imports stop at 2,000 rows).
    await addEntry('roster.jsonl', (put) => put(roster.map((r) => jsonLine({ ...r })).join('')))
    await addEntry('roster.csv', async (put) => {
      const header = ['email', 'name', 'role', 'section', 'group']
      const data = roster.map((r) => [r.email, r.displayName, r.role, r.sectionName, r.labGroupName].map(csvCell))
      await put('\uFEFF' + Papa.unparse({ fields: header, data }, { newline: '\r\n' }))
    })
    const book = await gradebookCsv(db, e, {})
    await addEntry('gradebook.csv', (put) => put(book.csv))

    const handIns = await addTable('hand-ins', (after) => pageSubmissions(db, courseId, after))

    // The files' descriptions (without the parsed columns), then each raw file byte for byte.
    const files = await addTable('files', async (after) =>
      (await pageFiles(db, courseId, after)).map((f) => ({ ...f, archivePath: rawPath(f) })),
    )
    await addEntry('parsed-values.jsonl', async (put) => {
      for (let after = 0; ;) {
        const batch = await pageParsedValues(db, courseId, after)
        if (batch.length === 0) break
        await put(
          batch
            .map((f) =>
              jsonLine({ fileId: f.id, submissionId: f.submissionId, tableKey: f.tableKey, columns: f.parsed }),
            )
            .join(''),
        )
        after = batch[batch.length - 1]!.id
      }
    })
    for (let after = 0; ;) {
      const batch = await pageFiles(db, courseId, after)
      if (batch.length === 0) break
      for (const f of batch) {
        const bytes = await fileBytes(db, courseId, f.id)
        if (!bytes) continue
        await addEntry(rawPath(f), (put) => put(bytes))
      }
      after = batch[batch.length - 1]!.id
    }

    // The photographs' descriptions, then each stored picture.
    const photos = await addTable('photos', async (after) =>
      (await pagePhotos(db, courseId, after)).map((p) => ({ ...p, archivePath: photoPath(p) })),
    )
    for (let after = 0; ;) {
      const batch = await pagePhotos(db, courseId, after)
      if (batch.length === 0) break
      for (const p of batch) {
        const bytes = await photoBytes(db, courseId, p.id)
        if (!bytes) continue
        await addEntry(photoPath(p), (put) => put(bytes))
      }
      after = batch[batch.length - 1]!.id
    }

    const checks = await addTable('checks', (after) => pageChecks(db, courseId, after))
    const flags = await addTable('flags', (after) => pageFlags(db, courseId, after))
    const staffChanges = await addTable('staff-changes', (after) => pageGradeChanges(db, courseId, after))
    const comments = await addTable('comments', (after) => pageComments(db, courseId, after))
    const recheckRequests = await addTable('recheck-requests', (after) => pageRechecks(db, courseId, after))

    // Every graded hand-in's feedback report, one made at a time.
    let feedbackReports = 0
    const reportsNotMade: ArchiveManifest['reportsNotMade'] = []
    for (let after = 0; ;) {
      const ids = await pageGradedSubmissionIds(db, courseId, after)
      if (ids.length === 0) break
      for (const id of ids) {
        let report: { filename: string; pdf: Buffer }
        try {
          report = await feedbackReportPdf(db, e, id, now)
        } catch (err) {
          // Results not shown yet (or grading failed): the hand-in is in the archive, its report is not.
          if (err instanceof AppError && err.status === 409) {
            reportsNotMade.push({ submissionId: id, reason: err.message })
            continue
          }
          throw err
        }
        await addEntry(`feedback-reports/${id}_${report.filename}`, (put) => put(report.pdf))
        feedbackReports++
      }
      after = ids[ids.length - 1]!
    }

    const manifest: ArchiveManifest = {
      course: {
        id: courseId,
        code: course.code,
        title: course.title,
        term: course.term,
        institution: course.institution,
      },
      generatedAt: now.toISOString(),
      counts: {
        rosterEntries: roster.length,
        handIns,
        files,
        photos,
        checks,
        flags,
        staffChanges,
        comments,
        recheckRequests,
        feedbackReports,
      },
      reportsNotMade,
      files: entries,
    }
    const text = JSON.stringify(manifest, null, 2) + '\n'
    const finished = entryDone('manifest.json')
    zip.append(text, { name: 'manifest.json', date: now })
    await finished
    await zip.finalize()
  }
  write().catch((err: unknown) => {
    zip.abort()
    out.destroy(err instanceof Error ? err : new Error(String(err)))
  })
  const day = now.toISOString().slice(0, 10)
  return {
    filename: `${fileSlug(course.code, 'course')}_${fileSlug(course.term, 'term')}_archive-${day}.zip`,
    stream: out,
  }
}

/** Where a raw file goes in the zip: under its hand-in, its id first so names never clash. */
function photoPath(p: { id: number; submissionId: number; imageKey: string; contentType: string }): string {
  return `photos/${p.submissionId}/${p.id}_${p.imageKey}.${p.contentType === 'image/png' ? 'png' : 'jpg'}`
}

function rawPath(f: { id: number; submissionId: number; filename: string }): string {
  const safe = f.filename.replace(/[^A-Za-z0-9._-]+/g, '_').replace(/^[._]+/, '') || 'file'
  return `files/${f.submissionId}/${f.id}_${safe}`
}
