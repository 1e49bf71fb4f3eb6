import { and, asc, eq, isNotNull, sql } from 'drizzle-orm'
import { alias } from 'drizzle-orm/mysql-core'
import type { Executor } from '../db/client'
import { dueExtensions, enrollments, moduleVersions, modules, users } from '../db/schema'

/** Per-student due dates. Rows outlive a removed enrollment (harmless; they apply again on return). */

export interface ModuleDue {
  id: number
  title: string
  dueAt: Date
}

/**
 * The due date an extension is measured against: that of the version students see (the published
 * one), or for a module not yet published, the version being edited.
 */
const shownVersionId = sql`COALESCE(${modules.publishedVersionId}, ${modules.currentVersionId})`

export async function listModulesWithDue(db: Executor, courseId: number): Promise<ModuleDue[]> {
  const rows = await db
    .select({ id: modules.id, title: moduleVersions.title, dueAt: moduleVersions.dueAt })
    .from(modules)
    .innerJoin(moduleVersions, eq(moduleVersions.id, shownVersionId))
    .where(and(eq(modules.courseId, courseId), isNotNull(moduleVersions.dueAt)))
    .orderBy(asc(modules.position), asc(modules.id))
  return rows.flatMap((r) => (r.dueAt ? [{ id: r.id, title: r.title, dueAt: r.dueAt }] : []))
}

export async function findModuleDue(
  db: Executor,
  courseId: number,
  moduleId: number,
): Promise<{ id: number; title: string; dueAt: Date | null } | null> {
  const rows = await db
    .select({ id: modules.id, title: moduleVersions.title, dueAt: moduleVersions.dueAt })
    .from(modules)
    .innerJoin(moduleVersions, eq(moduleVersions.id, shownVersionId))
    .where(and(eq(modules.courseId, courseId), eq(modules.id, moduleId)))
    .limit(1)
  return rows[0] ?? null
}

/** One student's extended due date on one module, or null. */
export async function findExtensionDue(db: Executor, moduleId: number, userId: number): Promise<Date | null> {
  const rows = await db
    .select({ dueAt: dueExtensions.dueAt })
    .from(dueExtensions)
    .where(and(eq(dueExtensions.moduleId, moduleId), eq(dueExtensions.userId, userId)))
    .limit(1)
  return rows[0]?.dueAt ?? null
}

export async function upsertExtension(
  db: Executor,
  v: { moduleId: number; userId: number; dueAt: Date; note: string; grantedBy: number },
): Promise<void> {
  await db
    .insert(dueExtensions)
    .values(v)
    .onDuplicateKeyUpdate({ set: { dueAt: v.dueAt, note: v.note, grantedBy: v.grantedBy } })
}

export async function deleteExtension(db: Executor, moduleId: number, userId: number): Promise<number> {
  const [res] = await db
    .delete(dueExtensions)
    .where(and(eq(dueExtensions.moduleId, moduleId), eq(dueExtensions.userId, userId)))
  return res.affectedRows
}

export interface ExtensionRow {
  moduleId: number
  userId: number
  displayName: string
  dueAt: Date
  note: string
  grantedBy: string | null
}

/** Extensions of people still enrolled in the course, on the course's modules. */
export async function listExtensions(db: Executor, courseId: number): Promise<ExtensionRow[]> {
  const granter = alias(users, 'granter')
  return db
    .select({
      moduleId: dueExtensions.moduleId,
      userId: dueExtensions.userId,
      displayName: users.displayName,
      dueAt: dueExtensions.dueAt,
      note: dueExtensions.note,
      grantedBy: granter.displayName,
    })
    .from(dueExtensions)
    .innerJoin(modules, eq(modules.id, dueExtensions.moduleId))
    .innerJoin(
      enrollments,
      and(eq(enrollments.userId, dueExtensions.userId), eq(enrollments.courseId, modules.courseId)),
    )
    .innerJoin(users, eq(users.id, dueExtensions.userId))
    .leftJoin(granter, eq(granter.id, dueExtensions.grantedBy))
    .where(eq(modules.courseId, courseId))
    .orderBy(asc(modules.position), asc(users.displayName))
}
