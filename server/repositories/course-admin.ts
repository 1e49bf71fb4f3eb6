import { and, asc, count, eq, inArray, sql } from 'drizzle-orm'
import type { CourseRole } from '../../shared/schemas/auth'
import type { LabGroupAdmin, PersonRef, SectionAdmin, TaPlacement } from '../../shared/schemas/course-admin'
import type { Executor } from '../db/client'
import { enrollments, labGroups, sections, submissions, users } from '../db/schema'

/** Sections, lab groups and placements of one course. Every lookup is scoped by course id. */

export interface SectionRow {
  id: number
  courseId: number
  name: string
  meets: string
}

export interface LabGroupRow {
  id: number
  courseId: number
  sectionId: number | null
  name: string
}

export interface MemberRow {
  userId: number
  displayName: string
  role: CourseRole
  sectionId: number | null
  labGroupId: number | null
}

const sectionCols = { id: sections.id, courseId: sections.courseId, name: sections.name, meets: sections.meets }
const groupCols = {
  id: labGroups.id,
  courseId: labGroups.courseId,
  sectionId: labGroups.sectionId,
  name: labGroups.name,
}

export async function findSection(
  db: Executor,
  courseId: number,
  sectionId: number,
  forUpdate = false,
): Promise<SectionRow | null> {
  const q = db
    .select(sectionCols)
    .from(sections)
    .where(and(eq(sections.id, sectionId), eq(sections.courseId, courseId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

export async function findLabGroup(
  db: Executor,
  courseId: number,
  labGroupId: number,
  forUpdate = false,
): Promise<LabGroupRow | null> {
  const q = db
    .select(groupCols)
    .from(labGroups)
    .where(and(eq(labGroups.id, labGroupId), eq(labGroups.courseId, courseId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

export async function findMember(
  db: Executor,
  courseId: number,
  userId: number,
  forUpdate = false,
): Promise<MemberRow | null> {
  const q = db
    .select({
      userId: enrollments.userId,
      displayName: users.displayName,
      role: enrollments.role,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.userId, userId)))
    .limit(1)
  const rows = forUpdate ? await q.for('update') : await q
  return rows[0] ?? null
}

export async function insertSection(
  db: Executor,
  courseId: number,
  v: { name: string; meets: string },
): Promise<number> {
  const [row] = await db
    .insert(sections)
    .values({ courseId, ...v })
    .$returningId()
  if (!row) throw new Error('insert into sections returned no id')
  return row.id
}

export async function updateSection(
  db: Executor,
  sectionId: number,
  v: { name?: string | undefined; meets?: string | undefined },
): Promise<void> {
  await db
    .update(sections)
    .set({ ...(v.name !== undefined ? { name: v.name } : {}), ...(v.meets !== undefined ? { meets: v.meets } : {}) })
    .where(eq(sections.id, sectionId))
}

export async function deleteSection(db: Executor, sectionId: number): Promise<void> {
  await db.delete(sections).where(eq(sections.id, sectionId))
}

/** How many people of each role are placed in a section. */
export async function sectionHeadcount(db: Executor, sectionId: number): Promise<Record<CourseRole, number>> {
  const rows = await db
    .select({ role: enrollments.role, n: count() })
    .from(enrollments)
    .where(eq(enrollments.sectionId, sectionId))
    .groupBy(enrollments.role)
  const out: Record<CourseRole, number> = { instructor: 0, ta: 0, student: 0 }
  for (const r of rows) out[r.role] = r.n
  return out
}

export async function insertLabGroup(
  db: Executor,
  courseId: number,
  v: { name: string; sectionId: number | null },
): Promise<number> {
  const [row] = await db
    .insert(labGroups)
    .values({ courseId, ...v })
    .$returningId()
  if (!row) throw new Error('insert into lab_groups returned no id')
  return row.id
}

export async function updateLabGroup(
  db: Executor,
  labGroupId: number,
  v: { name?: string | undefined; sectionId?: number | null | undefined },
): Promise<void> {
  await db
    .update(labGroups)
    .set({
      ...(v.name !== undefined ? { name: v.name } : {}),
      ...(v.sectionId !== undefined ? { sectionId: v.sectionId } : {}),
    })
    .where(eq(labGroups.id, labGroupId))
}

export async function deleteLabGroup(db: Executor, labGroupId: number): Promise<void> {
  await db.delete(labGroups).where(eq(labGroups.id, labGroupId))
}

export async function groupMembers(db: Executor, labGroupId: number): Promise<MemberRow[]> {
  return db
    .select({
      userId: enrollments.userId,
      displayName: users.displayName,
      role: enrollments.role,
      sectionId: enrollments.sectionId,
      labGroupId: enrollments.labGroupId,
    })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(eq(enrollments.labGroupId, labGroupId))
    .orderBy(asc(users.displayName))
}

export async function groupHandInCount(db: Executor, labGroupId: number): Promise<number> {
  const [row] = await db.select({ n: count() }).from(submissions).where(eq(submissions.labGroupId, labGroupId))
  return row?.n ?? 0
}

export async function setPlacement(
  db: Executor,
  courseId: number,
  userId: number,
  v: { sectionId: number | null; labGroupId: number | null },
): Promise<void> {
  await db
    .update(enrollments)
    .set(v)
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.userId, userId)))
}

/** Instructors of the course, locked so two removals cannot both pass the "not the last one" check. */
export async function lockInstructors(db: Executor, courseId: number): Promise<number[]> {
  const rows = await db
    .select({ userId: enrollments.userId })
    .from(enrollments)
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'instructor')))
    .for('update')
  return rows.map((r) => r.userId)
}

export async function deleteEnrollment(db: Executor, courseId: number, userId: number): Promise<void> {
  await db.delete(enrollments).where(and(eq(enrollments.courseId, courseId), eq(enrollments.userId, userId)))
}

/** Sections with their TAs, student counts and number of groups tied to them. */
export async function listSectionsAdmin(db: Executor, courseId: number): Promise<SectionAdmin[]> {
  const rows = await db
    .select({
      ...sectionCols,
      // Table names written out: in a one-table query Drizzle leaves a column like sections.id unqualified,
      // which inside the subquery would mean the subquery's own id.
      studentCount:
        sql<number>`(SELECT COUNT(*) FROM enrollments e WHERE e.section_id = sections.id AND e.role = 'student')`.mapWith(
          Number,
        ),
      labGroupCount: sql<number>`(SELECT COUNT(*) FROM lab_groups g WHERE g.section_id = sections.id)`.mapWith(Number),
    })
    .from(sections)
    .where(eq(sections.courseId, courseId))
    .orderBy(asc(sections.name))
  const tas = await db
    .select({ sectionId: enrollments.sectionId, userId: users.id, displayName: users.displayName })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'ta')))
    .orderBy(asc(users.displayName))
  return rows.map((s) => ({
    id: s.id,
    name: s.name,
    meets: s.meets,
    studentCount: s.studentCount,
    labGroupCount: s.labGroupCount,
    tas: tas.filter((t) => t.sectionId === s.id).map((t) => ({ userId: t.userId, displayName: t.displayName })),
  }))
}

export async function listLabGroupsAdmin(db: Executor, courseId: number): Promise<LabGroupAdmin[]> {
  const groups = await db
    .select({
      ...groupCols,
      sectionName: sections.name,
      handInCount: sql<number>`(SELECT COUNT(*) FROM submissions s WHERE s.lab_group_id = lab_groups.id)`.mapWith(
        Number,
      ),
    })
    .from(labGroups)
    .leftJoin(sections, eq(sections.id, labGroups.sectionId))
    .where(eq(labGroups.courseId, courseId))
    .orderBy(asc(labGroups.name))
  const ids = groups.map((g) => g.id)
  const members = ids.length
    ? await db
        .select({ labGroupId: enrollments.labGroupId, userId: users.id, displayName: users.displayName })
        .from(enrollments)
        .innerJoin(users, eq(users.id, enrollments.userId))
        .where(and(eq(enrollments.courseId, courseId), inArray(enrollments.labGroupId, ids)))
        .orderBy(asc(users.displayName))
    : []
  return groups.map((g) => ({
    id: g.id,
    name: g.name,
    sectionId: g.sectionId,
    sectionName: g.sectionName,
    handInCount: g.handInCount,
    members: members
      .filter((m) => m.labGroupId === g.id)
      .map((m): PersonRef => ({ userId: m.userId, displayName: m.displayName })),
  }))
}

export async function listTaPlacements(db: Executor, courseId: number): Promise<TaPlacement[]> {
  return db
    .select({ userId: users.id, displayName: users.displayName, email: users.email, sectionId: enrollments.sectionId })
    .from(enrollments)
    .innerJoin(users, eq(users.id, enrollments.userId))
    .where(and(eq(enrollments.courseId, courseId), eq(enrollments.role, 'ta')))
    .orderBy(asc(users.displayName))
}
