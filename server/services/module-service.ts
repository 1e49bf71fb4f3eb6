import { diffSources } from '../../shared/modules/diff'
import { checkModule } from '../../shared/modules/check'
import type {
  ModuleDiff,
  ModuleEditing,
  ModuleListItem,
  ModulePreview,
  ModuleReading,
  PublishResult,
  VersionSummary,
} from '../../shared/schemas/modules'
import { formatInZone } from '../../shared/time'
import { StudentModuleSpecSchema } from '../../shared/schemas/student-module-spec'
import type { Database } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import type { ModuleRow, VersionRow, VersionWrite } from '../repositories/modules'
import {
  courseTimeZone,
  findModule,
  findVersion,
  findVersions,
  insertModuleWithVersion,
  insertNextVersion,
  listModuleRows,
  listStudents,
  listVersionSummaries,
  markPublished,
  nextPosition,
  setModuleStatus,
  slugExists,
  submissionCounts,
  updateDraftVersion,
} from '../repositories/modules'
import { enqueueMail } from '../repositories/outbox'
import { pageLinks, sheetIssuedMail } from '../mail/templates'

const isStaff = (e: CourseEnrollment) => e.role === 'instructor' || e.role === 'ta'

function slugify(title: string): string {
  const s = title
    .normalize('NFKD')
    .replace(/[\u0300-\u036f]/g, '')
    .toLowerCase()
    .replace(/[^a-z0-9]+/g, '-')
    .replace(/^-+|-+$/g, '')
    .slice(0, 70)
  return s || 'module'
}

/** Parses, validates and renders a source into what a version row stores. */
export function toVersion(source: string, name: string, timeZoneFallback: string): VersionWrite {
  const c = checkModule(source, name, timeZoneFallback)
  return {
    source,
    html: c.html,
    frontMatter: c.frontMatter as Record<string, unknown> | null,
    title: c.title.slice(0, 200),
    dueAt: c.dueAt,
    issues: c.issues,
    valid: c.issues.length === 0,
  }
}

function listItem(
  m: ModuleRow,
  current: VersionRow | undefined,
  published: VersionRow | undefined,
  staff: boolean,
): ModuleListItem {
  const shown = staff ? (current ?? published) : published
  return {
    id: m.id,
    slug: m.slug,
    title: shown?.title ?? m.slug,
    status: m.status,
    dueAt: (shown?.dueAt ?? null)?.toISOString() ?? null,
    publishedVersionNumber: published?.number ?? null,
    hasAssignment: Boolean(shown?.frontMatter && 'assignment' in shown.frontMatter && shown.frontMatter.assignment),
    ...(staff && current
      ? { currentVersion: { id: current.id, number: current.number, status: current.status, valid: current.valid } }
      : {}),
  }
}

/** Students see published and closed modules; staff see drafts too. */
export async function listModules(db: Database, e: CourseEnrollment): Promise<ModuleListItem[]> {
  const staff = isStaff(e)
  const rows = await listModuleRows(db, e.courseId, staff ? undefined : ['published', 'closed'])
  const ids = rows.flatMap((r) => [r.currentVersionId, r.publishedVersionId]).filter((x): x is number => x !== null)
  const [versions, counts] = await Promise.all([
    findVersions(db, [...new Set(ids)]),
    staff ? submissionCounts(db, e.courseId) : null,
  ])
  return rows.map((r) => ({
    ...listItem(
      r,
      r.currentVersionId ? versions.get(r.currentVersionId) : undefined,
      r.publishedVersionId ? versions.get(r.publishedVersionId) : undefined,
      staff,
    ),
    ...(counts ? { submissionCount: counts.get(r.id) ?? 0 } : {}),
  }))
}

/**
 * The front matter as a student may see it: only what StudentModuleSpecSchema names (the grading
 * expressions, tolerances, uncertainties and review rules are dropped with every other key).
 */
function studentFrontMatter(fm: Record<string, unknown> | null): Record<string, unknown> | null {
  if (!fm) return null
  const parsed = StudentModuleSpecSchema.safeParse(fm)
  // The stored front matter passed the full schema when it was saved; failing here is a server fault.
  if (!parsed.success) throw new Error(`stored front matter does not fit the student's view: ${parsed.error.message}`)
  return parsed.data
}

export async function readModule(db: Database, e: CourseEnrollment, moduleId: number): Promise<ModuleReading> {
  const m = await findModule(db, e.courseId, moduleId)
  const staff = isStaff(e)
  // A draft does not exist for students: same answer as a module that is not there.
  if (!m || (!staff && m.status === 'draft') || m.publishedVersionId === null) {
    if (m && staff)
      throw new AppError(
        'not_published',
        'This module has not been issued to the class yet; open it in the editor.',
        409,
      )
    throw notFound('That module')
  }
  const v = await findVersion(db, m.publishedVersionId)
  if (!v) throw notFound('That module')
  const { timeZone } = await courseTimeZone(db, e.courseId)
  return {
    id: m.id,
    courseId: m.courseId,
    slug: m.slug,
    status: m.status,
    title: v.title,
    html: v.html,
    dueAt: v.dueAt?.toISOString() ?? null,
    timeZone,
    version: { id: v.id, number: v.number, publishedAt: v.publishedAt?.toISOString() ?? null },
    frontMatter: staff ? v.frontMatter : studentFrontMatter(v.frontMatter),
  }
}

async function editing(db: Database, courseId: number, moduleId: number): Promise<ModuleEditing> {
  const m = await findModule(db, courseId, moduleId)
  if (!m || m.currentVersionId === null) throw notFound('That module')
  const [current, summaries, { timeZone }, students] = await Promise.all([
    findVersion(db, m.currentVersionId),
    listVersionSummaries(db, m.id),
    courseTimeZone(db, courseId),
    listStudents(db, courseId),
  ])
  if (!current) throw notFound('That module')
  const summary = (id: number | null): VersionSummary | null => summaries.find((s) => s.id === id) ?? null
  const cur = summary(current.id)!
  return {
    id: m.id,
    courseId: m.courseId,
    slug: m.slug,
    status: m.status,
    timeZone,
    current: {
      ...cur,
      source: current.source,
      html: current.html,
      issues: current.issues,
      dueAt: current.dueAt?.toISOString() ?? null,
    },
    published: summary(m.publishedVersionId),
    studentCount: students.length,
  }
}

export function editModule(db: Database, e: CourseEnrollment, moduleId: number): Promise<ModuleEditing> {
  return editing(db, e.courseId, moduleId)
}

/**
 * The editor's live preview: the module's text checked and rendered as a save would store it, with
 * nothing stored. Rendered here rather than in the browser so the editor page does not download
 * the Markdown parser, KaTeX, the YAML parser and the expression engine.
 */
export async function previewModule(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  source: string,
): Promise<ModulePreview> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m) throw notFound('That module')
  const { timeZone } = await courseTimeZone(db, e.courseId)
  // Blocks carry their source lines so the editor's preview can follow the cursor.
  const c = checkModule(source, m.slug, timeZone, { sourceLines: true })
  return { title: c.title, html: c.html, dueAt: c.dueAt?.toISOString() ?? null, issues: c.issues }
}

export async function createModule(db: Database, e: CourseEnrollment, source: string): Promise<ModuleEditing> {
  const { timeZone } = await courseTimeZone(db, e.courseId)
  const v = toVersion(source, 'new module', timeZone)
  const moduleId = await db.transaction(async (tx) => {
    const base = slugify(v.title)
    let slug = base
    for (let n = 2; await slugExists(tx, e.courseId, slug); n++) slug = `${base}-${n}`
    const position = await nextPosition(tx, e.courseId)
    const { moduleId } = await insertModuleWithVersion(
      tx,
      { courseId: e.courseId, slug, position, createdBy: e.userId },
      v,
    )
    return moduleId
  })
  return editing(db, e.courseId, moduleId)
}

/**
 * Saves the editor's text. A draft version is updated in place; a published one is frozen, so
 * the save starts the next draft version. `baseVersionId` must still be the current version,
 * else someone else saved in between and the caller gets a conflict instead of overwriting.
 */
export async function saveModule(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  input: { source: string; baseVersionId: number },
): Promise<ModuleEditing> {
  const { timeZone } = await courseTimeZone(db, e.courseId)
  await db.transaction(async (tx) => {
    const m = await findModule(tx, e.courseId, moduleId, true)
    if (!m || m.currentVersionId === null) throw notFound('That module')
    if (m.currentVersionId !== input.baseVersionId) {
      throw new AppError(
        'edit_conflict',
        'Someone else saved this module after you opened it. Copy your changes, reload the editor, and apply them again.',
        409,
        { currentVersionId: m.currentVersionId },
      )
    }
    const current = await findVersion(tx, m.currentVersionId)
    if (!current) throw notFound('That module')
    const v = toVersion(input.source, m.slug, timeZone)
    if (current.status === 'draft') await updateDraftVersion(tx, current.id, v, e.userId)
    else await insertNextVersion(tx, m.id, current.number + 1, v, e.userId)
  })
  return editing(db, e.courseId, moduleId)
}

/**
 * Publishes the current draft version: it is frozen, students can read it, and one e-mail per
 * enrolled student is queued in the same transaction (so a publish without its mail, or mail
 * without the publish, cannot happen).
 */
export async function publishModule(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  versionId: number,
  appUrl: string,
): Promise<PublishResult> {
  const course = await courseTimeZone(db, e.courseId)
  const emailed = await db.transaction(async (tx) => {
    const m = await findModule(tx, e.courseId, moduleId, true)
    if (!m) throw notFound('That module')
    if (m.currentVersionId !== versionId) {
      throw new AppError('edit_conflict', 'The module changed since you opened it; reload before issuing it.', 409, {
        currentVersionId: m.currentVersionId,
      })
    }
    const v = await findVersion(tx, versionId)
    if (!v) throw notFound('That module version')
    if (v.status !== 'draft') {
      if (m.status !== 'published') {
        // Re-publishing an unpublished module's last published version.
        await setModuleStatus(tx, m.id, 'published')
        return 0
      }
      throw new AppError(
        'already_published',
        `Version ${v.number} is already issued. Edit the module to start a new version.`,
        409,
      )
    }
    if (!v.valid) {
      throw new AppError(
        'module_invalid',
        `“${v.title}” has ${v.issues.length} problem${v.issues.length === 1 ? '' : 's'} to fix before it can be issued.`,
        422,
        { issues: v.issues },
      )
    }
    await markPublished(tx, m.id, v.id, m.publishedVersionId, e.userId)
    const students = await listStudents(tx, e.courseId)
    const link = pageLinks(appUrl, course.slug).sheet(m.slug)
    const due = v.dueAt ? formatInZone(v.dueAt, course.timeZone) : null
    const update = m.publishedVersionId !== null
    await enqueueMail(
      tx,
      students.map((s) => ({
        dedupeKey: `module-published:${v.id}`,
        toAddress: s.email,
        toName: s.displayName,
        ...sheetIssuedMail({ name: s.displayName, course, title: v.title, due, link, update }),
      })),
    )
    return students.length
  })
  const list = await listModules(db, e)
  const module = list.find((x) => x.id === moduleId)
  if (!module) throw notFound('That module')
  return { module, emailed }
}

export async function unpublishModule(db: Database, e: CourseEnrollment, moduleId: number): Promise<ModuleListItem> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m) throw notFound('That module')
  if (m.status === 'draft') throw new AppError('not_published', 'This module is not issued to the class.', 409)
  await setModuleStatus(db, m.id, 'draft')
  const module = (await listModules(db, e)).find((x) => x.id === moduleId)
  if (!module) throw notFound('That module')
  return module
}

export async function moduleVersions(db: Database, e: CourseEnrollment, moduleId: number): Promise<VersionSummary[]> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m) throw notFound('That module')
  return listVersionSummaries(db, m.id)
}

async function versionOf(db: Database, e: CourseEnrollment, moduleId: number, versionId: number): Promise<VersionRow> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m) throw notFound('That module')
  const v = await findVersion(db, versionId)
  if (!v || v.moduleId !== m.id) throw notFound('That version')
  return v
}

export async function moduleVersionSource(db: Database, e: CourseEnrollment, moduleId: number, versionId: number) {
  const v = await versionOf(db, e, moduleId, versionId)
  return { id: v.id, number: v.number, status: v.status, source: v.source, html: v.html }
}

export async function diffModuleVersions(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  from: number,
  to: number,
): Promise<ModuleDiff> {
  const [a, b, summaries] = await Promise.all([
    versionOf(db, e, moduleId, from),
    versionOf(db, e, moduleId, to),
    listVersionSummaries(db, moduleId),
  ])
  const d = diffSources(a.source, b.source)
  return {
    from: summaries.find((s) => s.id === a.id)!,
    to: summaries.find((s) => s.id === b.id)!,
    added: d.added,
    removed: d.removed,
    hunks: d.hunks,
  }
}

export async function exportModule(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
): Promise<{ filename: string; source: string }> {
  const m = await findModule(db, e.courseId, moduleId)
  if (!m || m.currentVersionId === null) throw notFound('That module')
  const v = await findVersion(db, m.currentVersionId)
  if (!v) throw notFound('That module')
  return { filename: `${m.slug}-v${v.number}.md`, source: v.source }
}
