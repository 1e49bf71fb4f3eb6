/**
 * Line diff of two module sources, for the version history: hunks with a few lines of context,
 * like a unified diff but as data the client draws itself.
 */
import { structuredPatch } from 'diff'

export type DiffLineKind = 'add' | 'del' | 'ctx'

export interface DiffLine {
  kind: DiffLineKind
  /** The line's text without its line break. */
  text: string
}

export interface DiffHunk {
  /** 1-based first line of the hunk in the old source (0 when the old side is empty). */
  oldStart: number
  /** 1-based first line of the hunk in the new source (0 when the new side is empty). */
  newStart: number
  lines: DiffLine[]
}

export interface SourceDiff {
  /** Lines only in the new source. */
  added: number
  /** Lines only in the old source. */
  removed: number
  hunks: DiffHunk[]
}

/** Unchanged lines shown around each change. */
const CONTEXT_LINES = 3
/** A diff that takes longer than this is shown as "everything replaced" rather than hold a request. */
const DIFF_TIMEOUT_MS = 2000

/** Line breaks made uniform and a final line break ensured: neither is a change worth showing. */
function normalise(source: string): string {
  const lf = source.replace(/\r\n?/g, '\n')
  return lf === '' || lf.endsWith('\n') ? lf : `${lf}\n`
}

function linesOf(text: string): string[] {
  return text === '' ? [] : text.slice(0, -1).split('\n')
}

/**
 * The differences between two versions of a module source.
 *
 * @param a - the older source
 * @param b - the newer source
 * @returns counts of added and removed lines, and hunks with 3 lines of context
 */
export function diffSources(a: string, b: string): SourceDiff {
  const oldText = normalise(a)
  const newText = normalise(b)
  if (oldText === newText) return { added: 0, removed: 0, hunks: [] }

  const patch = structuredPatch('old', 'new', oldText, newText, undefined, undefined, {
    context: CONTEXT_LINES,
    timeout: DIFF_TIMEOUT_MS,
  })
  if (!patch) {
    const removedLines = linesOf(oldText)
    const addedLines = linesOf(newText)
    return {
      added: addedLines.length,
      removed: removedLines.length,
      hunks: [
        {
          oldStart: removedLines.length > 0 ? 1 : 0,
          newStart: addedLines.length > 0 ? 1 : 0,
          lines: [
            ...removedLines.map((text) => ({ kind: 'del' as const, text })),
            ...addedLines.map((text) => ({ kind: 'add' as const, text })),
          ],
        },
      ],
    }
  }

  let added = 0
  let removed = 0
  const hunks = patch.hunks.map((h) => ({
    oldStart: h.oldStart,
    newStart: h.newStart,
    lines: h.lines.flatMap((line): DiffLine[] => {
      const mark = line[0]
      const text = line.slice(1)
      if (mark === '+') {
        added++
        return [{ kind: 'add', text }]
      }
      if (mark === '-') {
        removed++
        return [{ kind: 'del', text }]
      }
      // '\' marks "no newline at end of file", which normalise() has made impossible.
      return mark === ' ' ? [{ kind: 'ctx', text }] : []
    }),
  }))
  return { added, removed, hunks }
}
