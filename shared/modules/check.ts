/**
 * Everything the editor and the server need to know about a module source, in one call: its
 * validated front matter, its rendered HTML, its due instant, and every problem — front matter,
 * expressions (parsed, checked against the assignment's names and run once on made-up data) and
 * body (calculator blocks, TeX). A module with issues can be saved as a draft but not published.
 */
import { zonedTimeToUtc } from '../time'
import { validateAssignmentExpressions } from './expressions'
import { formatPath, moduleIssue, parseModuleSource } from './front-matter'
import type { ModuleIssue } from './front-matter'
import { lintModuleBody, renderModule } from './render'
import type { ModuleFrontMatter } from './schema'

export interface ModuleCheck {
  /** The front matter's title, or the module name when it cannot be read. */
  title: string
  /** The validated front matter with defaults filled in, or null when it has problems. */
  frontMatter: ModuleFrontMatter | null
  /** Sanitised HTML of the body ('' when the source could not be split). */
  html: string
  /** The due date as a UTC instant, or null when there is none (or it cannot be read). */
  dueAt: Date | null
  /** Every problem found; empty for a module that can be published. */
  issues: ModuleIssue[]
}

/**
 * Parses, validates and renders a module source.
 *
 * @param source - the whole module
 * @param name - its name or slug, named in every message
 * @param timeZoneFallback - the course's IANA time zone, used when `due.timeZone` is left out
 * @param options - `sourceLines`: mark the HTML's blocks with their source lines (for the editor's preview)
 */
export function checkModule(
  source: string,
  name: string,
  timeZoneFallback: string,
  options: { sourceLines?: boolean } = {},
): ModuleCheck {
  const parsed = parseModuleSource(source, name)
  const body = parsed.ok ? parsed.body : parsed.body
  const bodyLine = (parsed.ok ? parsed.bodyLine : parsed.bodyLine) ?? 1
  const issues: ModuleIssue[] = parsed.ok ? [] : [...parsed.errors]

  let dueAt: Date | null = null
  if (parsed.ok) {
    const { frontMatter, lineOf } = parsed
    if (frontMatter.assignment) {
      for (const e of validateAssignmentExpressions(frontMatter.assignment)) {
        issues.push(moduleIssue(name, formatPath(e.path), e.message, lineOf(e.path)))
      }
    }
    if (frontMatter.due) {
      try {
        dueAt = zonedTimeToUtc(frontMatter.due.at, frontMatter.due.timeZone ?? timeZoneFallback)
      } catch (error) {
        issues.push(moduleIssue(name, 'due', (error as Error).message, lineOf(['due'])))
      }
    }
  }

  let html = ''
  if (body !== undefined) {
    html = renderModule(body, options.sourceLines ? { firstLine: bodyLine } : {})
    for (const lint of lintModuleBody(body)) {
      const line = lint.line === undefined ? undefined : lint.line + bodyLine - 1
      issues.push(moduleIssue(name, 'body', line === undefined ? lint.message : `line ${line}: ${lint.message}`, line))
    }
  }

  return {
    title: parsed.ok ? parsed.frontMatter.title : (parsed.title ?? name),
    frontMatter: parsed.ok ? parsed.frontMatter : null,
    html,
    dueAt,
    issues,
  }
}
