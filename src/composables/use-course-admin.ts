/**
 * Course administration for the instructor: sections, lab groups, TA sections, placements,
 * extensions, removal. Views and components take everything from here; only this file talks to
 * `api/course-admin.ts`. Every action returns null when it worked, or the ApiError to show.
 */
import { ref } from 'vue'
import type { Ref } from 'vue'
import type { z } from 'zod'
import type {
  CourseStructure,
  ExtensionInput,
  ExtensionOverview,
  LabGroupCreate,
  LabGroupUpdate,
  Placement,
  SectionCreate,
  SectionUpdate,
} from '@shared/schemas/course-admin'
import { ApiError } from '@/api/http'
import {
  deleteExtension,
  deleteLabGroup,
  deleteMember,
  deleteSection,
  fetchCourseStructure,
  fetchExtensions,
  patchLabGroup,
  patchPlacement,
  patchSection,
  postLabGroup,
  postSection,
  putExtension,
} from '@/api/course-admin'
import { useAction } from './use-action'
import { useResource } from './use-resource'

/** The first problem the shared schema finds in a form's value, as an ApiError the form can show. */
export function checkForm<S extends z.ZodType>(
  schema: S,
  value: unknown,
): { data: z.infer<S>; error: null } | { data: null; error: ApiError } {
  const parsed = schema.safeParse(value)
  if (parsed.success) return { data: parsed.data, error: null }
  const first = parsed.error.issues[0]
  return {
    data: null,
    error: new ApiError(400, 'validation_failed', first?.message ?? 'Check the form.', [
      { path: first?.path.join('.') ?? '', message: first?.message ?? '' },
    ]),
  }
}

/**
 * Editing rows of an admin list in place: which row is open, the error of the row last saved or
 * deleted, and which row waits for its delete to be confirmed.
 */
export function useRowEdits(remove: (id: number) => Promise<ApiError | null>) {
  const editing = ref<number | null>(null)
  const rowError = ref<{ id: number; error: ApiError } | null>(null)
  const confirming = ref<number | null>(null)
  function open(id: number) {
    editing.value = id
    rowError.value = null
    confirming.value = null
  }
  /** Runs the row's change; the row closes when it succeeds and shows the error when not. */
  async function save(id: number, change: () => Promise<ApiError | null>) {
    const err = await change()
    rowError.value = err ? { id, error: err } : null
    if (!err) editing.value = null
  }
  async function del(id: number) {
    const err = await remove(id)
    rowError.value = err ? { id, error: err } : null
    confirming.value = null
  }
  return { editing, rowError, confirming, open, save, del }
}

/** The field a 400/409 answer points at (`name`, `sectionId`, `dueAt`…), if any. */
export function errorField(err: ApiError | null): string | null {
  if (!err) return null
  const d = err.details as { field?: unknown } | { path?: unknown }[] | undefined
  if (Array.isArray(d)) return typeof d[0]?.path === 'string' ? d[0].path : null
  return typeof d?.field === 'string' ? d.field : null
}

/** Sections, lab groups and TA placements, with the changes that replace them. */
export function useCourseStructure(courseId: Ref<number>) {
  const res = useResource(() => fetchCourseStructure(courseId.value), courseId)
  // The panels show each failure at its own form or row, so no toast.
  const action = useAction(async (write: () => Promise<CourseStructure | void>, reload: boolean) => {
    const next = await write()
    if (next) res.data.value = next
    if (reload) await res.reload()
    return true
  })
  const change = async (write: () => Promise<CourseStructure | void>, reload = false): Promise<ApiError | null> =>
    (await action.run(write, reload)) ? null : action.error.value

  return {
    ...res,
    busy: action.busy,
    createSection: (b: SectionCreate) => change(() => postSection(courseId.value, b)),
    updateSection: (id: number, b: SectionUpdate) => change(() => patchSection(courseId.value, id, b)),
    removeSection: (id: number) => change(() => deleteSection(courseId.value, id)),
    createGroup: (b: LabGroupCreate) => change(() => postLabGroup(courseId.value, b)),
    updateGroup: (id: number, b: LabGroupUpdate) => change(() => patchLabGroup(courseId.value, id, b)),
    removeGroup: (id: number) => change(() => deleteLabGroup(courseId.value, id)),
    placeTa: (userId: number, sectionId: number | null) =>
      change(() => patchPlacement(courseId.value, userId, { sectionId }), true),
  }
}

/** What the roster's per-row actions need: the course structure, extensions, and the changes. */
export function useRosterAdmin(courseId: Ref<number>, enabled: Ref<boolean>, onChanged: () => Promise<void>) {
  const structure = useResource<CourseStructure | null>(
    () => (enabled.value ? fetchCourseStructure(courseId.value) : Promise.resolve(null)),
    () => [courseId.value, enabled.value],
  )
  const extensions = useResource<ExtensionOverview | null>(
    () => (enabled.value ? fetchExtensions(courseId.value) : Promise.resolve(null)),
    () => [courseId.value, enabled.value],
  )
  // The dialogs show each failure in place, so no toast.
  const action = useAction(async (write: () => Promise<unknown>, after: () => Promise<void>) => {
    await write()
    await after()
    return true
  })
  const run = async (write: () => Promise<unknown>, after: () => Promise<void>): Promise<ApiError | null> =>
    (await action.run(write, after)) ? null : action.error.value

  const refreshAll = async () => {
    await Promise.all([onChanged(), structure.reload()])
  }

  return {
    structure,
    extensions,
    busy: action.busy,
    place: (userId: number, p: Placement) => run(() => patchPlacement(courseId.value, userId, p), refreshAll),
    remove: (userId: number) => run(() => deleteMember(courseId.value, userId), refreshAll),
    grant: (moduleId: number, userId: number, input: ExtensionInput) =>
      run(
        async () => (extensions.data.value = await putExtension(courseId.value, moduleId, userId, input)),
        async () => {},
      ),
    revoke: (moduleId: number, userId: number) =>
      run(
        async () => (extensions.data.value = await deleteExtension(courseId.value, moduleId, userId)),
        async () => {},
      ),
  }
}

/** "YYYY-MM-DDTHH:mm" wall-clock time of an instant in a time zone, for a datetime-local field. */
export function localInputValue(instant: Date, timeZone: string): string {
  const parts = new Intl.DateTimeFormat('en-CA', {
    timeZone,
    hourCycle: 'h23',
    year: 'numeric',
    month: '2-digit',
    day: '2-digit',
    hour: '2-digit',
    minute: '2-digit',
  }).formatToParts(instant)
  const get = (t: string) => parts.find((p) => p.type === t)?.value ?? '00'
  return `${get('year')}-${get('month')}-${get('day')}T${get('hour')}:${get('minute')}`
}
