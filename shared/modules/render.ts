/**
 * Module Markdown → sanitised HTML, the same function for the stored HTML and for the editor's
 * preview (both rendered on the server, so the browser never downloads KaTeX or the Markdown parser).
 *
 * - markdown-it with raw HTML off (any HTML in the Markdown is shown as text), links turned on for
 *   bare URLs, and typographic quotes and dashes.
 * - TeX between $…$ (inline) and $$…$$ (display) rendered by KaTeX with `trust: false` (no \href,
 *   \url, \htmlStyle, \includegraphics …) and `throwOnError: false` (a TeX mistake shows as red text
 *   with the error in its title, and {@link lintModuleBody} reports it).
 * - A fenced block with the info string `calculator <kind>` becomes the placeholder the reading view
 *   mounts a live calculator on: `<div class="isentrope-calculator" data-kind="nozzle"
 *   data-defaults="{…json…}"></div>`. Its YAML body holds the calculator's starting inputs as
 *   `name: value` lines (numbers, text or true/false).
 * - The result is passed through sanitize-html with the allow-list in ./html-allow-list.ts (Markdown's
 *   tags, KaTeX's HTML, MathML and SVG, the calculator placeholder); links may only be http, https,
 *   mailto or relative. The browser runs DOMPurify with the same list over every module it shows.
 */
import katex from 'katex'
import MarkdownIt from 'markdown-it'
import type { Env } from 'markdown-it'
import texmath from 'markdown-it-texmath'
import sanitizeHtml from 'sanitize-html'
import { parseDocument } from 'yaml'
import { EXTERNAL_LINK_REL, MODULE_HTML, isExternalLink } from './html-allow-list'
import type { ModuleIssue } from './front-matter'

/** The live calculators a module can embed. */
export const CALCULATOR_KINDS = ['isentropic', 'normal-shock', 'nozzle', 'blowdown', 'combustion'] as const
export type CalculatorKind = (typeof CALCULATOR_KINDS)[number]

/** Starting inputs of an embedded calculator. */
export type CalculatorDefaults = Record<string, number | string | boolean>

type CalculatorBlock = { ok: true; kind: CalculatorKind; defaults: CalculatorDefaults } | { ok: false; message: string }

const CALCULATOR_INFO = /^calculator(?:\s|$)/
const DEFAULT_NAME = /^[A-Za-z][A-Za-z0-9_]*$/
const MAX_DEFAULTS = 40

function isCalculatorKind(kind: string): kind is CalculatorKind {
  return (CALCULATOR_KINDS as readonly string[]).includes(kind)
}

/** Reads a `calculator <kind>` block: its kind and its YAML of default inputs. */
function readCalculatorBlock(info: string, content: string): CalculatorBlock {
  const words = info.trim().split(/\s+/)
  const kind = words[1]
  const kinds = CALCULATOR_KINDS.join(', ')
  if (kind === undefined)
    return { ok: false, message: `say which calculator, e.g. "calculator nozzle"; the kinds are ${kinds}` }
  if (!isCalculatorKind(kind)) return { ok: false, message: `there is no calculator "${kind}"; the kinds are ${kinds}` }
  if (words.length > 2) return { ok: false, message: `write only "calculator ${kind}" after the three backticks` }

  const doc = parseDocument(content, { prettyErrors: false, uniqueKeys: true })
  const problem = doc.errors[0] ?? doc.warnings[0]
  if (problem) return { ok: false, message: `its inputs cannot be read as YAML: ${problem.message}` }
  let data: unknown
  try {
    data = doc.toJS({ maxAliasCount: 10 })
  } catch (error) {
    return { ok: false, message: `its inputs cannot be read as YAML: ${(error as Error).message}` }
  }
  if (data === null || data === undefined) return { ok: true, kind, defaults: {} }
  if (typeof data !== 'object' || Array.isArray(data)) {
    return { ok: false, message: 'write its inputs as "name: value" lines, e.g. "chamberPressure: 500000"' }
  }
  const entries = Object.entries(data)
  if (entries.length > MAX_DEFAULTS) return { ok: false, message: `a calculator takes at most ${MAX_DEFAULTS} inputs` }
  const defaults: CalculatorDefaults = {}
  for (const [name, value] of entries) {
    if (!DEFAULT_NAME.test(name))
      return { ok: false, message: `"${name}" is not an input name (letters, digits and _)` }
    const fine =
      (typeof value === 'number' && Number.isFinite(value)) ||
      typeof value === 'boolean' ||
      (typeof value === 'string' && value.length <= 200)
    if (!fine) return { ok: false, message: `the input "${name}" must be a number, a short text or true/false` }
    defaults[name] = value as number | string | boolean
  }
  return { ok: true, kind, defaults }
}

/** Most formulas typeset per module; the rest are shown as TeX source (and lintModuleBody says so). */
export const MAX_FORMULAS = 1000

/** The token types markdown-it-texmath produces for $…$ and $$…$$. */
const MATH_TOKENS = ['math_inline', 'math_inline_double', 'math_block', 'math_block_eqno'] as const

/** Per-render state passed through markdown-it. */
type RenderEnv = Env & { formulas?: number; firstLine?: number }

/** Options for {@link renderModule}. */
export interface RenderOptions {
  /**
   * The source line (1-based) of the Markdown's first line. When given, block elements carry
   * `data-source-line` with the source line they start on, so the editor's preview can follow the cursor.
   */
  firstLine?: number
}

const KATEX_OPTIONS = {
  throwOnError: false,
  // No \href, \url, \includegraphics, \htmlClass, \htmlId, \htmlStyle, \htmlData.
  trust: false,
  output: 'htmlAndMathml',
  // Non-standard TeX (e.g. Unicode letters in math) renders without console warnings.
  strict: 'ignore',
  // Bounds on what one formula can cost: sizes in em and macro expansions.
  maxSize: 20,
  maxExpand: 1000,
} as const

function createMarkdown() {
  const md = new MarkdownIt({ html: false, linkify: true, typographer: true })
  // markdown-it's own check lets data:image URLs through; we allow only web and mail links and
  // relative ones. sanitize-html checks the same again on the output.
  md.validateLink = (url: string) => {
    const scheme = /^\s*([a-zA-Z][a-zA-Z0-9+.-]*):/.exec(url)
    if (!scheme) return !/^\s*\/\//.test(url)
    return ['http', 'https', 'mailto'].includes((scheme[1] as string).toLowerCase())
  }
  // katexOptions is copied because texmath writes into the object it is given.
  md.use(texmath, { engine: katex, delimiters: 'dollars', katexOptions: { ...KATEX_OPTIONS } })

  // Each formula costs about half a millisecond to typeset and a few kilobytes of HTML to sanitise;
  // past MAX_FORMULAS the TeX is shown as code so one huge module cannot hold the server for seconds.
  for (const name of MATH_TOKENS) {
    const typeset = md.renderer.rules[name]
    if (!typeset) continue
    md.renderer.rules[name] = (tokens, idx, options, env, self) => {
      const state = (env ?? {}) as RenderEnv
      state.formulas = (state.formulas ?? 0) + 1
      if (state.formulas > MAX_FORMULAS) return `<code>${md.utils.escapeHtml(tokens[idx]?.content ?? '')}</code>`
      return typeset(tokens, idx, options, env, self)
    }
  }

  // The page around a module already has its one <h1> (the module's title), so the module's own
  // headings move one level down: # → <h2>, ## → <h3>, … (h6 stays h6).
  md.core.ruler.push('isentrope_demote_headings', (state) => {
    for (const t of state.tokens) {
      if (t.type === 'heading_open' || t.type === 'heading_close') {
        const level = Number(t.tag.slice(1))
        t.tag = `h${Math.min(6, level + 1)}`
      }
    }
  })

  // Block tokens know their lines (token.map, 0-based in the Markdown); only the editor asks for them.
  md.core.ruler.push('isentrope_source_lines', (state) => {
    const firstLine = (state.env as RenderEnv).firstLine
    if (firstLine === undefined) return
    for (const t of state.tokens) {
      if (t.block && t.map && t.nesting !== -1) t.attrSet('data-source-line', String(t.map[0] + firstLine))
    }
  })

  const fence = md.renderer.rules.fence
  md.renderer.rules.fence = (tokens, idx, options, env, self) => {
    const token = tokens[idx]
    if (token && CALCULATOR_INFO.test(token.info.trim())) {
      const block = readCalculatorBlock(token.info, token.content)
      if (!block.ok) {
        return `<div class="isentrope-module-error" role="note"${self.renderAttrs(token)}><strong>Calculator block:</strong> ${md.utils.escapeHtml(block.message)}</div>\n`
      }
      const json = md.utils.escapeHtml(JSON.stringify(block.defaults))
      return `<div class="isentrope-calculator" data-kind="${block.kind}" data-defaults="${json}"${self.renderAttrs(token)}></div>\n`
    }
    return fence ? fence(tokens, idx, options, env, self) : self.renderToken(tokens, idx, options)
  }
  return md
}

const markdown = createMarkdown()

// sanitize-html's options, built from the one allow-list the browser's sanitiser is built from too.
// https://github.com/apostrophecms/sanitize-html#readme
const SANITIZE_OPTIONS: sanitizeHtml.IOptions = {
  allowedTags: [...MODULE_HTML.tags],
  allowedAttributes: Object.fromEntries(Object.entries(MODULE_HTML.attributes).map(([t, a]) => [t, [...a]])),
  allowedClasses: Object.fromEntries(Object.entries(MODULE_HTML.classes).map(([t, c]) => [t, [...c]])),
  allowedStyles: Object.fromEntries(
    Object.entries(MODULE_HTML.styles).map(([t, s]) => [
      t,
      Object.fromEntries(Object.entries(s).map(([p, v]) => [p, [...v]])),
    ]),
  ),
  allowedSchemes: [...MODULE_HTML.schemes],
  allowedSchemesByTag: Object.fromEntries(Object.entries(MODULE_HTML.schemesByTag).map(([t, s]) => [t, [...s]])),
  allowedSchemesAppliedToAttributes: [...MODULE_HTML.urlAttributes],
  allowProtocolRelative: false,
  disallowedTagsMode: 'discard',
  transformTags: {
    a: (tagName, attribs) => {
      const { rel: _rel, ...rest } = attribs
      return { tagName, attribs: isExternalLink(attribs.href ?? '') ? { ...rest, rel: EXTERNAL_LINK_REL } : rest }
    },
  },
}

/**
 * Renders a module's Markdown body to sanitised HTML. Pure and deterministic: the same input gives
 * the same output in the browser and on the server.
 */
export function renderModule(markdownText: string, options: RenderOptions = {}): string {
  const env: RenderEnv = options.firstLine === undefined ? {} : { firstLine: options.firstLine }
  return sanitizeModuleHtml(markdown.render(markdownText, env))
}

/** HTML → what the module allow-list keeps of it (the server's sanitiser; the browser's is DOMPurify). */
export function sanitizeModuleHtml(html: string): string {
  return sanitizeHtml(html, SANITIZE_OPTIONS)
}

/**
 * Problems in a module body that still render, but wrongly: calculator blocks with an unknown kind
 * or unreadable inputs, and TeX that KaTeX cannot typeset. Lines count from 1 at the body's first
 * line; add the body's starting line to point into the whole source.
 */
export function lintModuleBody(body: string): ModuleIssue[] {
  const issues: ModuleIssue[] = []
  const tokens = markdown.parse(body, {})
  const lineOf = (map: [number, number] | null | undefined) => (map ? map[0] + 1 : undefined)
  const add = (message: string, line: number | undefined) =>
    issues.push(line === undefined ? { path: 'body', message } : { path: 'body', message, line })

  let formulas = 0
  const checkTex = (tex: string, displayMode: boolean, line: number | undefined) => {
    formulas++
    if (formulas === MAX_FORMULAS + 1) {
      add(`more than ${MAX_FORMULAS} formulas: from here on they are shown as TeX source; split the module`, line)
    }
    if (formulas > MAX_FORMULAS) return
    try {
      katex.renderToString(tex, { ...KATEX_OPTIONS, displayMode, throwOnError: true })
    } catch (error) {
      add(`TeX error in $${tex.length > 60 ? `${tex.slice(0, 60)}…` : tex}$: ${(error as Error).message}`, line)
    }
  }

  for (const token of tokens) {
    const line = lineOf(token.map)
    if (token.type === 'fence' && CALCULATOR_INFO.test(token.info.trim())) {
      const block = readCalculatorBlock(token.info, token.content)
      if (!block.ok) add(`calculator block: ${block.message}`, line)
    } else if (token.type === 'math_block' || token.type === 'math_block_eqno') {
      checkTex(token.content, true, line)
    } else if (token.type === 'inline') {
      for (const child of token.children ?? []) {
        if (child.type === 'math_inline' || child.type === 'math_inline_double') {
          checkTex(child.content, child.type === 'math_inline_double', line)
        }
      }
    }
  }
  return issues
}
