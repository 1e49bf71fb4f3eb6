import { z } from 'zod'

/**
 * Closing a course at the end of its term. The instructor confirms by typing the course's code, so a
 * course is never closed by a stray click; reopening needs no confirmation.
 */
export const CloseCourseSchema = z.object({
  confirmCode: z
    .string({ error: 'confirmCode: type the course code to confirm.' })
    .trim()
    .min(1, 'confirmCode: type the course code to confirm.')
    .max(32, 'confirmCode: at most 32 characters.'),
})
export type CloseCourse = z.infer<typeof CloseCourseSchema>

/** The course's closed state after closing or reopening it. */
export interface CourseClosedState {
  courseId: number
  /** ISO time the course was closed, or null when it is open. */
  closedAt: string | null
}
