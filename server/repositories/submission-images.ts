import { and, asc, eq } from 'drizzle-orm'
import type { Executor } from '../db/client'
import { submissionImages } from '../db/schema'

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
