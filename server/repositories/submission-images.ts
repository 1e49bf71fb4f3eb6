import { and, asc, eq } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { labGroups, submissionImages, submissions, users } from '../db/schema'
import { notOwnedBy } from './submissions'

export type NewSubmissionImage = typeof submissionImages.$inferInsert

/** Stores one photograph of a hand-in (inside the hand-in's transaction). */
export async function insertImage(tx: Executor, row: NewSubmissionImage): Promise<number> {
  const [inserted] = await tx.insert(submissionImages).values(row).$returningId()
  return inserted!.id
}

const describe = {
  imageKey: submissionImages.imageKey,
  contentType: submissionImages.contentType,
  width: submissionImages.width,
  height: submissionImages.height,
  size: submissionImages.size,
  sha256: submissionImages.sha256,
  originalSha256: submissionImages.originalSha256,
}

/** A hand-in's photographs without their bytes, in the order they were stored. */
export function listImages(db: Executor, submissionId: number) {
  return db
    .select(describe)
    .from(submissionImages)
    .where(eq(submissionImages.submissionId, submissionId))
    .orderBy(asc(submissionImages.id))
}

/** A hand-in's photographs with their bytes (the feedback report draws them). */
export function listImagesWithBytes(db: Executor, submissionId: number) {
  return db
    .select({ ...describe, bytes: submissionImages.bytes })
    .from(submissionImages)
    .where(eq(submissionImages.submissionId, submissionId))
    .orderBy(asc(submissionImages.id))
}

/** One stored picture, or null when the hand-in has no photograph under that key. */
export async function findImageBytes(db: Executor, submissionId: number, imageKey: string) {
  const rows = await db
    .select({ contentType: submissionImages.contentType, bytes: submissionImages.bytes })
    .from(submissionImages)
    .where(and(eq(submissionImages.submissionId, submissionId), eq(submissionImages.imageKey, imageKey)))
    .limit(1)
  return rows[0] ?? null
}

/** Someone else's hand-ins in the course with a photograph uploaded byte for byte the same. */
export function findIdenticalPhotos(
  db: Executor,
  courseId: number,
  originalSha256: string,
  owner: { userId: number; labGroupId: number | null },
): Promise<{ submissionId: number; submittedBy: string; labGroupName: string | null }[]> {
  return db
    .select({ submissionId: submissions.id, submittedBy: users.displayName, labGroupName: labGroups.name })
    .from(submissionImages)
    .innerJoin(submissions, eq(submissions.id, submissionImages.submissionId))
    .innerJoin(users, eq(users.id, submissions.userId))
    .leftJoin(labGroups, eq(labGroups.id, submissions.labGroupId))
    .where(
      and(
        eq(submissionImages.courseId, courseId),
        eq(submissionImages.originalSha256, originalSha256),
        notOwnedBy(owner),
      ),
    )
    .orderBy(asc(submissions.id))
    .limit(5)
}
