import { and, asc, count, desc, eq, inArray, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { ModuleIssue, ModuleStatus, VersionStatus, VersionSummary } from '../../shared/schemas/modules'
import type { Executor } from '../db/client'
import { courses, enrollments, moduleVersions, modules, submissions, users } from '../db/schema'

export interface ModuleRow {
  id: number
  courseId: number
  slug: string
  status: ModuleStatus
  position: number
  currentVersionId: number | null
  publishedVersionId: number | null
  gradesReleasedAt: Date | null
}

export interface VersionRow {
  id: number
  moduleId: number
  number: number
  status: VersionStatus
  source: string
  html: string
  frontMatter: Record<string, unknown> | null
  title: string
  dueAt: Date | null
  issues: ModuleIssue[]
  valid: boolean
  publishedAt: Date | null
}

const moduleCols = {
  id: modules.id,
  courseId: modules.courseId,
  slug: modules.slug,
  status: modules.status,
  position: modules.position,
  currentVersionId: modules.currentVersionId,
  publishedVersionId: modules.publishedVersionId,
  gradesReleasedAt: modules.gradesReleasedAt,
}

const versionCols = {
  id: moduleVersions.id,
  moduleId: moduleVersions.moduleId,
  number: moduleVersions.number,
  status: moduleVersions.status,
  source: moduleVersions.source,
  html: moduleVersions.html,
  frontMatter: moduleVersions.frontMatter,
  title: moduleVersions.title,
  dueAt: moduleVersions.dueAt,
  issues: moduleVersions.issues,
  valid: moduleVersions.valid,
  publishedAt: moduleVersions.publishedAt,
}

export async function findModule(
  db: Executor,
  courseId: number,
  moduleId: number,
  forUpdate = false,
): Promise<ModuleRow | null> {
  const q = db
    .select(moduleCols)
    .from(modules)
    .where(and(eq(modules.id, moduleId), eq(modules.courseId, courseId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

export async function listModuleRows(db: Executor, courseId: number, statuses?: ModuleStatus[]): Promise<ModuleRow[]> {
  return db
    .select(moduleCols)
    .from(modules)
    .where(
      statuses
        ? and(eq(modules.courseId, courseId), inArray(modules.status, statuses))
        : eq(modules.courseId, courseId),
    )
    .orderBy(asc(modules.position), asc(modules.id))
}

export async function findVersion(db: Executor, versionId: number): Promise<VersionRow | null> {
  const rows = await db.select(versionCols).from(moduleVersions).where(eq(moduleVersions.id, versionId)).limit(1)
  return rows[0] ?? null
}

export async function findVersions(db: Executor, ids: number[]): Promise<Map<number, VersionRow>> {
  if (ids.length === 0) return new Map()
  const rows = await db.select(versionCols).from(moduleVersions).where(inArray(moduleVersions.id, ids))
  return new Map(rows.map((r) => [r.id, r]))
}

export async function slugExists(db: Executor, courseId: number, slug: string): Promise<boolean> {
  const rows = await db
    .select({ id: modules.id })
    .from(modules)
    .where(and(eq(modules.courseId, courseId), eq(modules.slug, slug)))
    .limit(1)
  return rows.length > 0
}

export async function nextPosition(db: Executor, courseId: number): Promise<number> {
  const [row] = await db
    .select({ max: sql<number | null>`MAX(${modules.position})` })
    .from(modules)
    .where(eq(modules.courseId, courseId))
  return (row?.max ?? 0) + 1
}

export interface VersionWrite {
  source: string
  html: string
  frontMatter: Record<string, unknown> | null
  title: string
  dueAt: Date | null
  issues: ModuleIssue[]
  valid: boolean
}

export async function insertModuleWithVersion(
  db: Executor,
  m: { courseId: number; slug: string; position: number; createdBy: number },
  v: VersionWrite,
): Promise<{ moduleId: number; versionId: number }> {
  const [mod] = await db
    .insert(modules)
    .values({ ...m, status: 'draft' })
    .$returningId()
  const moduleId = mod!.id
  const [ver] = await db
    .insert(moduleVersions)
    .values({ ...v, moduleId, number: 1, status: 'draft', createdBy: m.createdBy, updatedBy: m.createdBy })
    .$returningId()
  const versionId = ver!.id
  await db.update(modules).set({ currentVersionId: versionId }).where(eq(modules.id, moduleId))
  return { moduleId, versionId }
}

export async function updateDraftVersion(
  db: Executor,
  versionId: number,
  v: VersionWrite,
  userId: number,
): Promise<void> {
  await db
    .update(moduleVersions)
    .set({ ...v, updatedBy: userId })
    .where(eq(moduleVersions.id, versionId))
}

export async function insertNextVersion(
  db: Executor,
  moduleId: number,
  number: number,
  v: VersionWrite,
  userId: number,
): Promise<number> {
  const [ver] = await db
    .insert(moduleVersions)
    .values({ ...v, moduleId, number, status: 'draft', createdBy: userId, updatedBy: userId })
    .$returningId()
  await db.update(modules).set({ currentVersionId: ver!.id }).where(eq(modules.id, moduleId))
  return ver!.id
}

export async function markPublished(
  db: Executor,
  moduleId: number,
  versionId: number,
  previousPublishedId: number | null,
  userId: number,
) {
  if (previousPublishedId !== null && previousPublishedId !== versionId) {
    await db.update(moduleVersions).set({ status: 'superseded' }).where(eq(moduleVersions.id, previousPublishedId))
  }
  await db
    .update(moduleVersions)
    .set({ status: 'published', publishedAt: sql`CURRENT_TIMESTAMP(3)`, publishedBy: userId })
    .where(eq(moduleVersions.id, versionId))
  await db.update(modules).set({ status: 'published', publishedVersionId: versionId }).where(eq(modules.id, moduleId))
}

export async function setModuleStatus(db: Executor, moduleId: number, status: ModuleStatus): Promise<void> {
  await db.update(modules).set({ status }).where(eq(modules.id, moduleId))
}

export async function listVersionSummaries(db: Executor, moduleId: number): Promise<VersionSummary[]> {
  const creator = alias(users, 'creator')
  const updater = alias(users, 'updater')
  const publisher = alias(users, 'publisher')
  const rows = await db
    .select({
      id: moduleVersions.id,
      number: moduleVersions.number,
      status: moduleVersions.status,
      title: moduleVersions.title,
      valid: moduleVersions.valid,
      createdBy: creator.displayName,
      createdAt: moduleVersions.createdAt,
      updatedBy: updater.displayName,
      updatedAt: moduleVersions.updatedAt,
      publishedBy: publisher.displayName,
      publishedAt: moduleVersions.publishedAt,
    })
    .from(moduleVersions)
    .leftJoin(creator, eq(creator.id, moduleVersions.createdBy))
    .leftJoin(updater, eq(updater.id, moduleVersions.updatedBy))
    .leftJoin(publisher, eq(publisher.id, moduleVersions.publishedBy))
    .where(eq(moduleVersions.moduleId, moduleId))
    .orderBy(desc(moduleVersions.number))
  return rows.map((r) => ({
    ...r,
    createdAt: r.createdAt.toISOString(),
    updatedAt: r.updatedAt.toISOString(),
    publishedAt: r.publishedAt ? r.publishedAt.toISOString() : null,
  }))
}

export async function courseTimeZone(
  db: Executor,
  courseId: number,
): Promise<{ timeZone: string; code: string; title: string; slug: string }> {
  const [row] = await db
    // The slug is generated from code and term and never NULL (see the schema).
    .select({
      timeZone: courses.timeZone,
      code: courses.code,
      title: courses.title,
      slug: sql<string>`${courses.slug}`,
    })
    .from(courses)
    .where(eq(courses.id, courseId))
  if (!row) throw new Error(`course ${courseId} not found`)
  return row
}

export async function listStudents(db: Executor, courseId: number): Promise<{ email: string; displayName: string }[]> {
  return db
    .select({ email: users.email, displayName: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'student')))
    .orderBy(asc(users.id))
}

/** Hand-ins per module of a course (staff's module list). */
export async function submissionCounts(db: Executor, courseId: number): Promise<Map<number, number>> {
  const rows = await db
    .select({ moduleId: submissions.moduleId, n: count() })
    .from(submissions)
    .where(eq(submissions.courseId, courseId))
    .groupBy(submissions.moduleId)
  return new Map(rows.map((r) => [r.moduleId, r.n]))
}
