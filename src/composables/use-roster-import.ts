import { computed, ref, shallowRef, watch } from 'vue'
import type { Ref } from 'vue'
import { decodeRosterBytes } from '@shared/roster/decode-bytes'
import { parseRosterCsv } from '@shared/roster/import-csv'
import type {
  RosterFileProblem,
  RosterFileRefusal,
  RosterImportPreview,
  RosterImportRequest,
  RosterImportResult,
  RosterRowsRefusal,
} from '@shared/schemas/roster-import'
import { confirmRosterImport, previewRosterImport } from '@/api/roster-import'
import { ApiError, asApiError } from '@/api/http'
import type { LoadState } from './use-resource'

/** Base64 of the file's bytes, in slices (String.fromCharCode takes a bounded number of arguments). */
function toBase64(bytes: Uint8Array): string {
  let binary = ''
  for (let i = 0; i < bytes.length; i += 0x8000) binary += String.fromCharCode(...bytes.subarray(i, i + 0x8000))
  return btoa(binary)
}

/**
 * The roster import screen's state: the CSV text (from a file or pasted), the server's preview of
 * it, and the confirmed import's result. The file is read here first with the same reader the
 * server uses, so a file without the required columns or over a limit is refused before sending;
 * the server's preview is still the authority. A chosen file is sent as its bytes, so the server
 * detects its encoding itself; once its text is edited on the page, the edited text is sent
 * instead. Editing the text or the declared language drops a preview that no longer matches, and
 * the confirm sends exactly what was previewed, with the moves the instructor unticked.
 */
export function useRosterImport(courseId: Ref<number>) {
  const csv = ref('')
  const fileName = ref<string | null>(null)
  /** The chosen file's bytes and the text they decoded to (null when the rows were typed). */
  let file: { bytes: Uint8Array; text: string } | null = null
  /** The file's language when its header does not show it ('' = from the header). */
  const locale = ref('')
  /** Rows whose move the instructor unticked. */
  const skippedMoves = ref<Set<number>>(new Set())
  const previewState = ref<LoadState>('idle')
  const preview = shallowRef<RosterImportPreview | null>(null)
  const previewError = shallowRef<ApiError | null>(null)
  const fileProblems = shallowRef<RosterFileProblem[]>([])
  const confirmState = ref<LoadState>('idle')
  const result = shallowRef<RosterImportResult | null>(null)
  const confirmError = shallowRef<ApiError | null>(null)
  let previewedCsv = ''
  let previewedBody: RosterImportRequest | null = null

  function clearOutcome() {
    previewState.value = 'idle'
    preview.value = null
    previewError.value = null
    fileProblems.value = []
    confirmState.value = 'idle'
    result.value = null
    confirmError.value = null
    skippedMoves.value = new Set()
  }

  watch(csv, (text) => {
    if (text !== previewedCsv) clearOutcome()
  })
  watch(locale, () => clearOutcome())

  async function chooseFile(chosen: File | null) {
    fileName.value = chosen?.name ?? null
    if (!chosen) {
      file = null
      csv.value = ''
      return
    }
    const bytes = new Uint8Array(await chosen.arrayBuffer())
    const decoded = decodeRosterBytes(bytes)
    file = { bytes, text: decoded.text }
    csv.value = decoded.text
  }

  /** The chosen file's own bytes while its text is untouched; otherwise the text on the page. */
  function requestBody(text: string): RosterImportRequest {
    const fromFile = file !== null && file.text === text
    return {
      ...(fromFile ? { file: toBase64(file!.bytes) } : { csv: text }),
      ...(locale.value !== '' ? { locale: locale.value } : {}),
    }
  }

  async function runPreview() {
    clearOutcome()
    const text = csv.value
    previewedCsv = text
    const fromFile = file !== null && file.text === text
    const local = parseRosterCsv(fromFile ? file!.bytes : text, { locale: locale.value || undefined })
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
    const body = requestBody(text)
    previewedBody = body
    try {
      const p = await previewRosterImport(courseId.value, body)
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
    if (!preview.value?.ok || !previewedBody) return
    confirmState.value = 'loading'
    confirmError.value = null
    const skip = preview.value.rows
      .filter((r) => skippedMoves.value.has(r.row))
      .map((r) => ({ row: r.row, email: r.email }))
    try {
      result.value = await confirmRosterImport(courseId.value, { ...previewedBody, skip })
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

  /** Ticks or unticks one row's move (ticked: the move is made). */
  function keepMove(row: number, keep: boolean) {
    const next = new Set(skippedMoves.value)
    if (keep) next.delete(row)
    else next.add(row)
    skippedMoves.value = next
  }

  /** Starts over for another file. */
  function startOver() {
    previewedCsv = ''
    previewedBody = null
    file = null
    csv.value = ''
    fileName.value = null
    clearOutcome()
  }

  /** Moves that will be made: those in the preview, less the unticked ones. */
  const movesToMake = computed(() => (preview.value?.counts.moves ?? 0) - skippedMoves.value.size)
  const nothingToDo = computed(() => {
    const c = preview.value?.counts
    return !!c && c.new === 0 && c.changed === 0 && c.invalid === 0 && movesToMake.value === 0
  })

  return {
    csv,
    fileName,
    locale,
    skippedMoves,
    movesToMake,
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
    keepMove,
    startOver,
  }
}
