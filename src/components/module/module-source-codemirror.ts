/**
 * The CodeMirror 6 editor behind ModuleSourceEditor.vue. This file is only ever imported
 * dynamically, so CodeMirror lands in a chunk of its own that only the module editor fetches.
 *
 * Only the pieces the editor uses are imported (no `codemirror` basicSetup, and not lang-markdown's
 * `markdown()`, which brings the HTML, CSS and JavaScript languages along for HTML inside Markdown;
 * module Markdown has raw HTML turned off anyway).
 * https://codemirror.net/docs/guide/#bundling
 */
import { defaultKeymap, history, historyKeymap } from '@codemirror/commands'
import { HighlightStyle, syntaxHighlighting } from '@codemirror/language'
import { markdownLanguage } from '@codemirror/lang-markdown'
import { yamlFrontmatter } from '@codemirror/lang-yaml'
import { lintGutter, lintKeymap, setDiagnostics } from '@codemirror/lint'
import type { Diagnostic } from '@codemirror/lint'
import { EditorSelection, EditorState } from '@codemirror/state'
import type { Extension } from '@codemirror/state'
import { EditorView, highlightActiveLine, highlightActiveLineGutter, keymap, lineNumbers } from '@codemirror/view'
import { tags } from '@lezer/highlight'

/** A problem to mark: its 1-based line in the whole source and its message. */
export interface LineProblem {
  line: number
  message: string
}

export interface SourceEditorOptions {
  doc: string
  /** id of the element that names the editor (its visible label). */
  labelledBy: string
  /** id of the help text under the editor. */
  describedBy?: string
  onChange: (doc: string) => void
  /** Called with the cursor's 1-based line whenever it moves to another line. */
  onCursorLine: (line: number) => void
}

export interface SourceEditor {
  /** Replaces the whole text (e.g. after discarding changes); not reported through onChange. */
  setDoc(doc: string): void
  /** Shows these problems as markers in the gutter and underlines on their lines. */
  setProblems(problems: readonly LineProblem[]): void
  /** Puts the cursor at the start of a line, scrolls it into view and focuses the editor. */
  goToLine(line: number): void
  focus(): void
  destroy(): void
}

// Colours from the app's palette, each at least 4.5:1 on white.
const highlight = HighlightStyle.define([
  { tag: tags.heading, fontWeight: '700', color: '#1e2a44' },
  { tag: tags.strong, fontWeight: '700' },
  { tag: tags.emphasis, fontStyle: 'italic' },
  { tag: tags.strikethrough, textDecoration: 'line-through' },
  { tag: [tags.link, tags.url], color: '#2c55a8', textDecoration: 'underline' },
  { tag: tags.monospace, color: '#7a3618' },
  { tag: tags.quote, color: '#5d574c', fontStyle: 'italic' },
  { tag: [tags.processingInstruction, tags.meta, tags.contentSeparator], color: '#5d574c' },
  { tag: [tags.propertyName, tags.definition(tags.propertyName)], color: '#1f5a8a' },
  { tag: [tags.string, tags.special(tags.string)], color: '#1f6b3a' },
  { tag: [tags.number, tags.bool, tags.null, tags.atom], color: '#7a4b00' },
  { tag: tags.comment, color: '#5d574c', fontStyle: 'italic' },
  { tag: tags.invalid, color: '#a01c2c' },
])

const theme = EditorView.theme({
  '&': { backgroundColor: '#fff', color: 'var(--text)', fontSize: '0.88rem', height: '100%' },
  '.cm-scroller': { fontFamily: 'var(--font-num)', lineHeight: '1.5', overflow: 'auto' },
  '.cm-content': { padding: '0.5rem 0' },
  '.cm-gutters': {
    backgroundColor: 'var(--paper-deep)',
    color: 'var(--text-muted)',
    borderRight: '1px solid var(--rule)',
  },
  '.cm-activeLine': { backgroundColor: 'rgba(44, 98, 201, 0.06)' },
  '.cm-activeLineGutter': { backgroundColor: 'rgba(44, 98, 201, 0.12)', color: 'var(--text)' },
  // ModuleSourceEditor.vue draws the app's focus ring around the editor's box.
  '&.cm-focused': { outline: 'none' },
  '.cm-lintRange-error': { backgroundColor: 'rgba(160, 28, 44, 0.08)' },
  '.cm-tooltip-lint': { fontFamily: 'var(--font-ui)', maxWidth: 'min(36rem, 90vw)' },
})

function diagnostics(state: EditorState, problems: readonly LineProblem[]): Diagnostic[] {
  const last = state.doc.lines
  return problems.map((p) => {
    // The problems come from a check of a slightly older text while typing; keep them in range.
    const line = state.doc.line(Math.min(Math.max(1, p.line), last))
    return { from: line.from, to: line.to, severity: 'error', message: p.message, source: 'publish check' }
  })
}

export function createSourceEditor(parent: HTMLElement, options: SourceEditorOptions): SourceEditor {
  let lastLine = 0
  let quiet = false
  const extensions: Extension[] = [
    lineNumbers(),
    lintGutter(),
    highlightActiveLineGutter(),
    highlightActiveLine(),
    history(),
    // Tab is not bound, so it still moves focus out of the editor (no keyboard trap). The lint keys
    // reach the problems without a mouse: F8 goes to the next one, Ctrl/Cmd+Shift+M lists them.
    keymap.of([...defaultKeymap, ...historyKeymap, ...lintKeymap]),
    yamlFrontmatter({ content: markdownLanguage }),
    syntaxHighlighting(highlight),
    EditorView.lineWrapping,
    theme,
    EditorView.contentAttributes.of({
      'aria-labelledby': options.labelledBy,
      ...(options.describedBy ? { 'aria-describedby': options.describedBy } : {}),
      spellcheck: 'true',
      autocorrect: 'off',
      autocapitalize: 'off',
      // Focusable already (contenteditable); the explicit tab stop lets checkers see that the
      // scrolling box around it is reachable by keyboard.
      tabindex: '0',
    }),
    EditorView.updateListener.of((u) => {
      if (u.docChanged && !quiet) options.onChange(u.state.doc.toString())
      if (u.selectionSet || u.docChanged) {
        const line = u.state.doc.lineAt(u.state.selection.main.head).number
        if (line !== lastLine) {
          lastLine = line
          options.onCursorLine(line)
        }
      }
    }),
  ]
  // Keep Windows line endings as they were, so an unchanged text still compares equal to the saved one.
  if (options.doc.includes('\r\n')) extensions.push(EditorState.lineSeparator.of('\r\n'))

  const view = new EditorView({ parent, state: EditorState.create({ doc: options.doc, extensions }) })

  return {
    setDoc(doc) {
      if (doc === view.state.doc.toString()) return
      quiet = true
      try {
        view.dispatch({ changes: { from: 0, to: view.state.doc.length, insert: doc } })
      } finally {
        quiet = false
      }
    },
    setProblems(problems) {
      view.dispatch(setDiagnostics(view.state, diagnostics(view.state, problems)))
    },
    goToLine(n) {
      const line = view.state.doc.line(Math.min(Math.max(1, n), view.state.doc.lines))
      view.dispatch({ selection: EditorSelection.cursor(line.from), scrollIntoView: true })
      view.focus()
    },
    focus() {
      view.focus()
    },
    destroy() {
      view.destroy()
    },
  }
}
