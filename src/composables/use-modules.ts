import { onScopeDispose, ref, watch } from 'vue'
import type { Ref } from 'vue'
import type { ModuleEditing, ModuleIssue } from '@shared/schemas/modules'
import { ApiError } from '@/api/http'
import {
  createModule,
  exportUrl,
  fetchDiff,
  fetchModule,
  fetchModuleForEditing,
  fetchModules,
  fetchVersions,
  previewModule,
  publishModule,
  saveModule,
  unpublishModule,
} from '@/api/modules'
import { useResource } from './use-resource'

export function useModuleList(courseId: Ref<number>) {
  return useResource(() => fetchModules(courseId.value), courseId)
}

export function useModuleReading(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchModule(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

export function useModuleEditing(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchModuleForEditing(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

export function useModuleVersions(courseId: Ref<number>, moduleId: Ref<number>) {
  return useResource(
    () => fetchVersions(courseId.value, moduleId.value),
    () => [courseId.value, moduleId.value],
  )
}

/** A new module in the course (from the starter text or an imported file). */
export function useModuleCreate(courseId: Ref<number>) {
  return { create: (source: string) => createModule(courseId.value, source) }
}

/** The line diff between two versions of a module. */
export function useVersionDiff(courseId: Ref<number>, moduleId: Ref<number>) {
  return { compare: (from: number, to: number) => fetchDiff(courseId.value, moduleId.value, from, to) }
}

/** The editor's writes: save a draft on top of a version, publish a version, withdraw, and the export link. */
export function useModuleWrites(courseId: Ref<number>, moduleId: Ref<number>) {
  return {
    save: (source: string, baseVersionId: number) => saveModule(courseId.value, moduleId.value, source, baseVersionId),
    publish: (versionId: number) => publishModule(courseId.value, moduleId.value, versionId),
    unpublish: () => unpublishModule(courseId.value, moduleId.value),
    exportHref: () => exportUrl(courseId.value, moduleId.value),
  }
}

export interface EditorPreview {
  title: string
  html: string
  dueAt: Date | null
  issues: ModuleIssue[]
}

/**
 * The editor's live preview of its text. The saved text shows what the server stored with it; other
 * text is checked and rendered by the server (the same check a save runs) a moment after typing
 * stops, and the newest answer wins. `error` says why a preview could not be made (the last good one
 * stays on screen).
 */
export function useModulePreview(
  courseId: Ref<number>,
  moduleId: Ref<number>,
  source: Ref<string>,
  saved: Ref<ModuleEditing | null>,
  delayMs = 250,
) {
  const preview = ref<EditorPreview>({ title: '', html: '', dueAt: null, issues: [] })
  const error = ref('')
  let timer: ReturnType<typeof setTimeout> | undefined
  let asked = 0

  async function ask(text: string) {
    const mine = ++asked
    try {
      const p = await previewModule(courseId.value, moduleId.value, text)
      if (mine !== asked) return
      preview.value = { title: p.title, html: p.html, dueAt: p.dueAt ? new Date(p.dueAt) : null, issues: p.issues }
      error.value = ''
    } catch (err) {
      if (mine !== asked) return
      error.value = `The preview could not be updated: ${err instanceof ApiError ? err.message : String(err)}`
    }
  }

  watch(
    [source, saved],
    ([text, m]) => {
      clearTimeout(timer)
      if (!m) return
      if (text === m.current.source) {
        asked++
        const c = m.current
        preview.value = { title: c.title, html: c.html, dueAt: c.dueAt ? new Date(c.dueAt) : null, issues: c.issues }
        error.value = ''
        // The stored HTML shows at once; the server's preview of the same text adds the source-line
        // marks the preview scrolls by when the cursor moves.
        void ask(text)
        return
      }
      if (text.trim() === '') {
        asked++
        preview.value = {
          title: '',
          html: '',
          dueAt: null,
          issues: [{ path: '', message: 'The module text is empty.' }],
        }
        error.value = ''
        return
      }
      timer = setTimeout(() => void ask(text), delayMs)
    },
    { immediate: true },
  )
  onScopeDispose(() => clearTimeout(timer))
  return { preview, error }
}
