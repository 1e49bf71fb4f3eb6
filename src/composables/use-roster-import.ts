import { computed, ref, shallowRef, watch } from 'vue'
import type { Ref } from 'vue'
import { parseRosterCsv } from '@shared/roster/import-csv'
import type {
  RosterFileProblem,
  RosterFileRefusal,
  RosterImportPreview,
  RosterImportResult,
  RosterRowsRefusal,
} from '@shared/schemas/roster-import'
import { confirmRosterImport, previewRosterImport } from '@/api/roster-import'
import { ApiError, asApiError } from '@/api/http'
import type { LoadState } from './use-resource'

/**
 * The roster import screen's state: the CSV text (from a file or pasted), the server's preview of
 * it, and the confirmed import's result. The file is read here first with the same reader the
 * server uses, so a file without the required columns or over a limit is refused before sending;
 * the server's preview is still the authority. Editing the text drops a preview that no longer
 * matches it, and the confirm sends exactly the text that was previewed.
 */
export function useRosterImport(courseId: Ref<number>) {
  const csv = ref('')
  const fileName = ref<string | null>(null)
  const previewState = ref<LoadState>('idle')
  const preview = shallowRef<RosterImportPreview | null>(null)
  const previewError = shallowRef<ApiError | null>(null)
  const fileProblems = shallowRef<RosterFileProblem[]>([])
  const confirmState = ref<LoadState>('idle')
  const result = shallowRef<RosterImportResult | null>(null)
  const confirmError = shallowRef<ApiError | null>(null)
  let previewedCsv = ''

  function clearOutcome() {
    previewState.value = 'idle'
    preview.value = null
    previewError.value = null
    fileProblems.value = []
    confirmState.value = 'idle'
    result.value = null
    confirmError.value = null
  }

  watch(csv, (text) => {
    if (text !== previewedCsv) clearOutcome()
  })

  async function chooseFile(file: File | null) {
    fileName.value = file?.name ?? null
    csv.value = file ? await file.text() : ''
  }

  async function runPreview() {
    clearOutcome()
    const text = csv.value
    previewedCsv = text
    const local = parseRosterCsv(text)
    if (!local.ok) {
      fileProblems.value = local.problems
      previewError.value = new ApiError(
        422,
        'roster_file_refused',
        local.problems[0]?.message ?? 'The file cannot be read.',
        {
          problems: local.problems,
        },
      )
      previewState.value = 'error'
      return
    }
    previewState.value = 'loading'
    try {
      const p = await previewRosterImport(courseId.value, text)
      if (previewedCsv !== text) return
      preview.value = p
      previewState.value = 'done'
    } catch (err) {
      if (previewedCsv !== text) return
      const e = asApiError(err)
      previewError.value = e
      fileProblems.value =
        e.code === 'roster_file_refused' ? ((e.details as RosterFileRefusal | undefined)?.problems ?? []) : []
      previewState.value = 'error'
    }
  }

  async function runConfirm() {
    if (!preview.value?.ok) return
    confirmState.value = 'loading'
    confirmError.value = null
    try {
      result.value = await confirmRosterImport(courseId.value, previewedCsv)
      confirmState.value = 'done'
    } catch (err) {
      const e = asApiError(err)
      confirmError.value = e
      // The server found problems the preview did not (the roster changed meanwhile): show its view.
      if (e.code === 'roster_rows_invalid') {
        const p = (e.details as RosterRowsRefusal | undefined)?.preview
        if (p) preview.value = p
      }
      confirmState.value = 'error'
    }
  }

  /** Starts over for another file. */
  function startOver() {
    previewedCsv = ''
    csv.value = ''
    fileName.value = null
    clearOutcome()
  }

  const nothingToDo = computed(() => {
    const c = preview.value?.counts
    return !!c && c.new === 0 && c.changed === 0 && c.invalid === 0
  })

  return {
    csv,
    fileName,
    previewState,
    preview,
    previewError,
    fileProblems,
    confirmState,
    result,
    confirmError,
    nothingToDo,
    chooseFile,
    runPreview,
    runConfirm,
    startOver,
  }
}
