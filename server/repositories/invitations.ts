import { and, eq, gt, inArray, isNull } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { courses, invitations, users } from '../db/schema'

export interface InvitationWrite {
  userId: number
  courseId: number | null
  tokenHash: string
  expiresAt: Date
  createdBy: number | null
}

/** Inserts invitations; returns token hash → invitation id. */
export async function insertInvitations(db: Executor, rows: InvitationWrite[]): Promise<Map<string, number>> {
  if (rows.length === 0) return new Map()
  await db.insert(invitations).values(rows)
  const ids = await db
    .select({ id: invitations.id, tokenHash: invitations.tokenHash })
    .from(invitations)
    .where(
      inArray(
        invitations.tokenHash,
        rows.map((r) => r.tokenHash),
      ),
    )
  return new Map(ids.map((r) => [r.tokenHash, r.id]))
}

export interface InvitationRow {
  id: number
  userId: number
  email: string
  displayName: string
  courseCode: string | null
  courseTitle: string | null
  expiresAt: Date
  usedAt: Date | null
  isSiteAdmin: boolean
}

export async function findInvitationByHash(db: Executor, tokenHash: string): Promise<InvitationRow | null> {
  const rows = await db
    .select({
      id: invitations.id,
      userId: invitations.userId,
      email: users.email,
      displayName: users.displayName,
      isSiteAdmin: users.isSiteAdmin,
      courseCode: courses.code,
      courseTitle: courses.title,
      expiresAt: invitations.expiresAt,
      usedAt: invitations.usedAt,
    })
    .from(invitations)
    .innerJoin(users, eq(users.id, invitations.userId))
    .leftJoin(courses, eq(courses.id, invitations.courseId))
    .where(eq(invitations.tokenHash, tokenHash))
    .limit(1)
  return rows[0] ?? null
}

/**
 * Marks one invitation used, only if it is still unused and unexpired at `now`. Returns whether
 * this call did it: of two concurrent uses of the same link exactly one gets `true`.
 */
export async function claimInvitation(db: Executor, id: number, now: Date): Promise<boolean> {
  const [res] = await db
    .update(invitations)
    .set({ usedAt: now })
    .where(and(eq(invitations.id, id), isNull(invitations.usedAt), gt(invitations.expiresAt, now)))
  return ((res as { affectedRows?: number }).affectedRows ?? 0) === 1
}

/** Retires every other open invitation of the person, so an older link cannot reset the new password. */
export async function retireOpenInvitations(db: Executor, userId: number, now: Date): Promise<void> {
  await db
    .update(invitations)
    .set({ usedAt: now })
    .where(and(eq(invitations.userId, userId), isNull(invitations.usedAt)))
}

export async function setPasswordHash(db: Executor, userId: number, passwordHash: string): Promise<void> {
  await db.update(users).set({ passwordHash }).where(eq(users.id, userId))
}
