import { pipeline } from 'node:stream/promises'
import { Router } from 'express'
import { CloseCourseSchema } from '../../shared/schemas/course-closing'
import type { Database } from '../db/client'
import { INSTRUCTOR, courseArchiver, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import { courseArchiveZip } from '../services/course-archive-service'
import { closeCourse, reopenCourse } from '../services/course-closing-service'

/**
 * The end of a term, mounted at /api/courses/:courseId. Who may call:
 * - GET  /archive.zip   the course's instructor or a site administrator (TA and student 403, others
 *   404): the whole course as one zip, streamed, open or closed.
 * - POST /close         instructor, confirming with the course code: the course becomes read-only,
 *   hidden from students.
 * - POST /reopen        instructor: a closed course is open again (the one write a closed course takes).
 */
export function courseArchiveRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })

  r.get('/archive.zip', courseArchiver(db), async (req, res) => {
    const { filename, stream } = await courseArchiveZip(db, enrollmentOf(res))
    res.attachment(filename).type('application/zip').set('Cache-Control', 'private, no-store')
    try {
      await pipeline(stream, res)
      req.log.info({ courseId: enrollmentOf(res).courseId }, 'course archive sent')
    } catch (err) {
      // Headers are gone: the download is cut off, which the browser shows as a failed download.
      req.log.warn({ err, courseId: enrollmentOf(res).courseId }, 'course archive stopped')
    }
  })

  r.post('/close', courseMember(db, INSTRUCTOR), validate('body', CloseCourseSchema), async (_req, res) => {
    res.json(await closeCourse(db, enrollmentOf(res), valid(res, 'body', CloseCourseSchema)))
  })

  r.post('/reopen', courseMember(db, INSTRUCTOR, { whenClosed: 'allow' }), async (_req, res) => {
    res.json(await reopenCourse(db, enrollmentOf(res)))
  })

  return r
}
