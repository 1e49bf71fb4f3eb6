/**
 * The end of a term for the instructor: closing the course (confirmed by typing its code) and
 * reopening it. Only this file talks to `api/course-closing.ts`.
 */
import { CloseCourseSchema } from '@shared/schemas/course-closing'
import type { CourseClosedState } from '@shared/schemas/course-closing'
import { postCloseCourse, postReopenCourse } from '@/api/course-closing'
import { checkForm } from './use-course-admin'
import { useAction } from './use-action'

export function useCourseClosing(courseId: () => number, onChanged: (state: CourseClosedState) => void) {
  const closing = useAction(
    async (confirmCode: string) => {
      const form = checkForm(CloseCourseSchema, { confirmCode })
      if (form.error) throw form.error
      const state = await postCloseCourse(courseId(), form.data)
      onChanged(state)
      return state
    },
    // A wrong code is shown beside the field; other failures as a toast.
    { success: 'Course closed', failure: 'Not closed', inPlace: (e) => e.status === 400 },
  )
  const reopening = useAction(
    async () => {
      const state = await postReopenCourse(courseId())
      onChanged(state)
      return state
    },
    { success: 'Course reopened', failure: 'Not reopened' },
  )
  return { closing, reopening }
}
