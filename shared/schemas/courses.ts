import { z } from 'zod'
import type { CourseRole } from './auth'
import { singleLineName } from './names'

const isTimeZone = (tz: string): boolean => {
  try {
    new Intl.DateTimeFormat('en-US', { timeZone: tz })
    return true
  } catch {
    return false
  }
}

/** Creating a course (site administrators). */
export const CreateCourseSchema = z.object({
  code: singleLineName({
    field: 'course code',
    min: 2,
    max: 32,
    messages: { tooShort: 'Course code needs at least 2 characters.', tooLong: 'Course code: at most 32 characters.' },
  }),
  title: singleLineName({
    field: 'course title',
    min: 3,
    max: 200,
    messages: { tooShort: 'Title needs at least 3 characters.', tooLong: 'Title: at most 200 characters.' },
  }),
  term: singleLineName({
    field: 'term',
    min: 2,
    max: 40,
    messages: { tooShort: 'Term needs at least 2 characters.', tooLong: 'Term: at most 40 characters.' },
  }),
  institution: singleLineName({
    field: 'institution',
    min: 2,
    max: 200,
    messages: { tooShort: 'Institution needs at least 2 characters.' },
  }),
  timeZone: z.string().trim().refine(isTimeZone, 'Time zone must be an IANA name such as America/Denver.'),
})
export type CreateCourse = z.infer<typeof CreateCourseSchema>

/** `:courseId` and similar path parameters. */
export const CourseIdParamsSchema = z.object({
  courseId: z.coerce
    .number({ error: 'courseId must be a number.' })
    .int()
    .positive('courseId must be a positive whole number.'),
})

export interface CourseSummary {
  id: number
  code: string
  title: string
  term: string
  institution: string
  timeZone: string
  /** The course's key in page addresses: code and term, lower case, hyphenated. */
  slug: string
  /** When the course was closed at the end of its term (ISO time), or null while it is open. */
  closedAt: string | null
  role: CourseRole
  sectionName: string | null
  labGroupName: string | null
}

export interface SectionSummary {
  id: number
  name: string
  meets: string
  studentCount: number
  tas: string[]
}

export interface CourseHome {
  course: CourseSummary
  /** Staff only; an empty list for students. */
  sections: SectionSummary[]
  /** My lab-group partners (students), names only. */
  labGroupMembers: string[]
  counts: { students: number; tas: number; instructors: number }
}

export interface RosterEntry {
  userId: number
  displayName: string
  email: string
  role: CourseRole
  sectionName: string | null
  labGroupName: string | null
  sectionId: number | null
  labGroupId: number | null
}

/** A course's readable key in page addresses, e.g. `/c/ae-4410-winter-2027`. */
export const CourseSlugParamsSchema = z.object({
  courseSlug: z
    .string()
    .max(80, 'courseSlug: at most 80 characters.')
    .regex(/^[a-z0-9]+(?:-[a-z0-9]+)*$/, 'courseSlug: lower-case letters, digits and single hyphens.'),
})

/**
 * How page addresses map to ids: the course and the lab sheets this person may open, each by its
 * slug. Students get the sheets they can read (issued or closed); staff get every sheet.
 */
export interface CourseKeys {
  courseId: number
  slug: string
  sheets: { id: number; slug: string }[]
}
