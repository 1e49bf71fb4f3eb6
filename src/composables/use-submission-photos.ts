/**
 * A hand-in's photographs for the result and review pages: each stored picture's address, size and
 * marks, with its label from the sheet and the exit diameter the student typed (for the readout in
 * exit diameters). The sheet is read only when the hand-in has photographs and the page does not
 * already hold it.
 */
import { computed } from 'vue'
import type { Ref } from 'vue'
import type { JetMarks } from '@shared/images/jet-marks'
import { valueToSI } from '@shared/modules/quantities'
import type { StudentAssignment } from '@shared/schemas/student-module-spec'
import type { SubmissionDetail } from '@shared/schemas/submissions'
import { fetchModule } from '@/api/modules'
import { submissionImageUrl } from '@/api/submissions'
import { useResource } from './use-resource'
import { studentAssignment } from './use-submissions'

export interface PhotoView {
  key: string
  label: string
  instructions?: string
  /** GET …/submissions/:submissionId/images/:imageKey */
  src: string
  width: number
  height: number
  marks: JetMarks
  /** m; absent when the sheet names no exit diameter or it was not typed. */
  exitDiameter?: number
}

/** The photographs of a hand-in as the pages show them (labels from the sheet, else the key). */
export function photoViews(
  courseId: number,
  detail: SubmissionDetail,
  assignment: StudentAssignment | null,
): PhotoView[] {
  return (detail.images ?? []).map((img) => {
    const spec = assignment?.images.find((s) => s.key === img.key)
    const typed = spec?.scaleFrom ? detail.inputs.measurements[spec.scaleFrom] : undefined
    let exitDiameter: number | undefined
    try {
      exitDiameter = typed ? valueToSI(typed.value, typed.unit) : undefined
    } catch {
      exitDiameter = undefined
    }
    return {
      key: img.key,
      label: spec?.label ?? img.key,
      ...(spec?.instructions ? { instructions: spec.instructions } : {}),
      src: submissionImageUrl(courseId, detail.id, img.key),
      width: img.width,
      height: img.height,
      marks: img.marks,
      ...(exitDiameter !== undefined ? { exitDiameter } : {}),
    }
  })
}

/**
 * The photographs of the hand-in in `detail`; `assignment` when the page has read the sheet already,
 * else the sheet is read here (only when there are photographs).
 */
export function useSubmissionPhotos(
  courseId: Ref<number>,
  detail: Ref<SubmissionDetail | null>,
  assignment?: Ref<StudentAssignment | null>,
) {
  const moduleId = computed(() =>
    !assignment && detail.value && (detail.value.images?.length ?? 0) > 0 ? detail.value.moduleId : null,
  )
  const reading = useResource(
    async () => (moduleId.value === null ? null : fetchModule(courseId.value, moduleId.value)),
    () => [courseId.value, moduleId.value],
  )
  const sheet = computed<StudentAssignment | null>(() => {
    if (assignment) return assignment.value
    try {
      return studentAssignment(reading.data.value?.frontMatter)
    } catch {
      return null
    }
  })
  return computed<PhotoView[]>(() => (detail.value ? photoViews(courseId.value, detail.value, sheet.value) : []))
}
