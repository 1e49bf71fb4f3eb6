import { computed, reactive, shallowRef, watch } from 'vue'
import type { Ref } from 'vue'
import { RolloverRequestSchema, weeksBetween } from '@shared/schemas/course-rollover'
import type { RolloverPlan, RolloverRequest, RolloverResult } from '@shared/schemas/course-rollover'
import type { FieldIssue } from '@shared/schemas/errors'
import { confirmRollover, previewRollover } from '@/api/course-rollover'
import { useAction } from './use-action'

export type RolloverField = 'code' | 'title' | 'term' | 'startDate' | 'shiftWeeks'

/**
 * The "start next term" form: the new course's code, title and term, the two terms' start dates
 * (the shift in whole weeks is proposed from them and can be changed), and whether the TAs come
 * along. The preview shows what would be created; changing any field drops it, so the confirm
 * always sends exactly what was previewed. The server checks everything again on confirm.
 */
export function useCourseRollover(courseId: Ref<number>) {
  const form = reactive({
    code: '',
    title: '',
    term: '',
    /** This term's first day: only to propose the shift, never sent. */
    thisStart: '',
    startDate: '',
    shiftWeeks: 0,
    copyTas: false,
  })
  const plan = shallowRef<RolloverPlan | null>(null)
  const result = shallowRef<RolloverResult | null>(null)
  const localIssues = shallowRef<FieldIssue[]>([])
  let previewed: RolloverRequest | null = null

  const preview = useAction((body: RolloverRequest) => previewRollover(courseId.value, body))
  const confirm = useAction((body: RolloverRequest) => confirmRollover(courseId.value, body), {
    success: (r) => ({ summary: 'Next term’s course created', detail: `${r.course.code} · ${r.course.term}` }),
  })

  /** The proposed shift: whole weeks between the two start dates. */
  const proposedWeeks = computed(() => weeksBetween(form.thisStart, form.startDate))
  watch(proposedWeeks, (w) => {
    if (w !== null) form.shiftWeeks = w
  })
  watch(
    () => ({ ...form }),
    () => {
      localIssues.value = []
      if (plan.value || preview.error.value || confirm.error.value) {
        plan.value = null
        previewed = null
        preview.error.value = null
        confirm.error.value = null
      }
    },
  )

  function body(): RolloverRequest {
    return {
      code: form.code,
      title: form.title,
      term: form.term,
      startDate: form.startDate,
      shiftWeeks: form.shiftWeeks,
      copyTas: form.copyTas,
    }
  }

  /** Field problems: the browser's own check first (same schema as the server), then the server's. */
  const fieldErrors = computed<Partial<Record<RolloverField, string>>>(() => {
    const out: Partial<Record<RolloverField, string>> = {}
    const e = confirm.error.value ?? preview.error.value
    const server: FieldIssue[] =
      e?.code === 'validation_failed' && Array.isArray(e.details) ? (e.details as FieldIssue[]) : []
    for (const i of [...localIssues.value, ...server]) out[i.path as RolloverField] ??= i.message
    if (e?.code === 'course_exists') {
      out.code ??= e.message
      out.term ??= e.message
    }
    return out
  })

  function checkLocally(b: RolloverRequest): boolean {
    const parsed = RolloverRequestSchema.safeParse(b)
    localIssues.value = parsed.success
      ? []
      : parsed.error.issues.map((i) => ({ path: i.path.join('.'), message: i.message }))
    return parsed.success
  }

  async function runPreview() {
    const b = body()
    plan.value = null
    result.value = null
    if (!checkLocally(b)) return
    const p = await preview.run(b)
    if (p) {
      plan.value = p
      previewed = b
    }
  }

  async function runConfirm() {
    if (!previewed) return
    const r = await confirm.run(previewed)
    if (r) result.value = r
  }

  return { form, proposedWeeks, plan, result, preview, confirm, fieldErrors, runPreview, runConfirm }
}
