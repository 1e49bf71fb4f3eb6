import type { Database } from '../db/client'
import { flagDigestMail, pageLinks } from '../mail/templates'
import { listCourseStaff } from '../repositories/enrollments'
import { enqueueMail } from '../repositories/outbox'
import { claimUndigestedFlags, markFlagsDigested } from '../repositories/review'

/**
 * One e-mail per teaching assistant listing the flags raised in their section since the last
 * digest (never one mail per flag). Flags of students without a section go to the instructors.
 * The flags are claimed with SKIP LOCKED and marked in the same transaction as the mail is queued,
 * so two server processes never send the same flag twice.
 * @returns how many digest e-mails were queued
 */
export async function queueFlagDigests(db: Database, appUrl: string, batch = 500): Promise<number> {
  return db.transaction(async (tx) => {
    const flags = await claimUndigestedFlags(tx, batch)
    if (flags.length === 0) return 0

    // Who reads each (course, section): its TAs, or the course's instructors when there are none.
    const courseIds = [...new Set(flags.map((f) => f.courseId))]
    const staff = await listCourseStaff(tx, courseIds)

    const perReader = new Map<
      string,
      { email: string; name: string; code: string; courseSlug: string; courseId: number; items: typeof flags }
    >()
    for (const f of flags) {
      const tas = staff.filter(
        (s) => s.courseId === f.courseId && s.role === 'ta' && s.sectionId !== null && s.sectionId === f.sectionId,
      )
      const readers = tas.length ? tas : staff.filter((s) => s.courseId === f.courseId && s.role === 'instructor')
      for (const r of readers) {
        const key = `${r.courseId}:${r.email}`
        const entry = perReader.get(key) ?? {
          email: r.email,
          name: r.name,
          code: r.code,
          courseSlug: r.courseSlug,
          courseId: r.courseId,
          items: [],
        }
        entry.items.push(f)
        perReader.set(key, entry)
      }
    }
    const stamp = Date.now()
    await enqueueMail(
      tx,
      [...perReader.values()].map((r) => {
        const links = pageLinks(appUrl, r.courseSlug)
        return {
          dedupeKey: `flag-digest:${r.courseId}:${stamp}:${r.items[0]!.id}`,
          toAddress: r.email,
          toName: r.name,
          ...flagDigestMail({
            name: r.name,
            courseCode: r.code,
            items: r.items.map((f) => ({
              student: f.student,
              sheetTitle: f.moduleTitle,
              message: f.message,
              link: links.review(f.submissionId),
            })),
            queueLink: links.reviewQueue,
          }),
        }
      }),
    )
    await markFlagsDigested(
      tx,
      flags.map((f) => f.id),
    )
    return perReader.size
  })
}
