/**
 * Splits a module source into YAML front matter and Markdown body, parses the YAML and validates it
 * against {@link FrontMatterSchema}. Every problem comes back as a {@link ModuleIssue} that names the
 * module, the path in the front matter (e.g. `assignment.results[2].tolerance`) and the line of the
 * source, so the editor can point at it.
 *
 * A source looks like
 * ```
 * ---
 * title: Nozzle flow
 * ---
 * Markdown…
 * ```
 * Windows line endings and a leading byte-order mark are accepted.
 */
import { LineCounter, isMap, isScalar, isSeq, parseDocument } from 'yaml'
import type { Document } from 'yaml'
import { z } from 'zod'
import { utf8ByteLength } from '../text'
import { FrontMatterSchema, ModuleTitleSchema } from './schema'
import type { ModuleFrontMatter } from './schema'

/** One problem with a module, for the editor. `line` is 1-based in the whole source. */
export interface ModuleIssue {
  /** Where in the front matter (`assignment.results[2].tolerance`), or `body`, or '' for the whole source. */
  path: string
  message: string
  line?: number
}

export type ParsedModule =
  | {
      ok: true
      frontMatter: ModuleFrontMatter
      body: string
      /** 1-based line of the source on which the body starts. */
      bodyLine: number
      /** The source line of a front-matter path (or of its nearest existing parent). */
      lineOf: (path: readonly (string | number)[]) => number | undefined
    }
  | {
      ok: false
      errors: ModuleIssue[]
      /** The body and the title as far as they could be read, so a broken module still previews. */
      body?: string
      bodyLine?: number
      title?: string
    }

/** Largest module source, in bytes of UTF-8. */
export const MAX_SOURCE_BYTES = 1_048_576

/** `['assignment', 'results', 2, 'tolerance']` → `assignment.results[2].tolerance`. */
export function formatPath(path: readonly PropertyKey[]): string {
  let text = ''
  for (const p of path) {
    if (typeof p === 'number') text += `[${p}]`
    else text += text === '' ? String(p) : `.${String(p)}`
  }
  return text
}

/** A ModuleIssue whose message names the module and the path: `cold-flow: assignment.results[2]: …`. */
export function moduleIssue(name: string, path: string, problem: string, line?: number): ModuleIssue {
  const message = path === '' ? `${name}: ${problem}` : `${name}: ${path}: ${problem}`
  return line === undefined ? { path, message } : { path, message, line }
}

const FENCE = /^---[ \t]*$/

interface Split {
  yaml: string
  body: string
  /** 1-based source line of the first YAML line. */
  yamlLine: number
  bodyLine: number
}

function splitFrontMatter(source: string): Split | string {
  const lines = source.split('\n')
  if (!FENCE.test(lines[0] ?? '')) {
    return 'a module starts with its front matter: a line "---", the YAML (at least a title), and another line "---"'
  }
  const close = lines.findIndex((l, i) => i > 0 && FENCE.test(l))
  if (close < 0) return 'the front matter is not closed: add a line "---" after the YAML'
  return {
    yaml: lines.slice(1, close).join('\n'),
    body: lines.slice(close + 1).join('\n'),
    yamlLine: 2,
    bodyLine: close + 2,
  }
}

/** The offset in the YAML text where a path starts, or where its nearest existing parent does. */
function offsetOf(doc: Document, path: readonly (string | number)[]): number | undefined {
  let node: unknown = doc.contents
  let best: number | undefined = isScalar(node) || isMap(node) || isSeq(node) ? node.range?.[0] : undefined
  for (const segment of path) {
    if (isMap(node)) {
      const pair = node.items.find((p) => isScalar(p.key) && String(p.key.value) === String(segment))
      if (!pair) break
      if (isScalar(pair.key) && pair.key.range) best = pair.key.range[0]
      node = pair.value
    } else if (isSeq(node) && typeof segment === 'number') {
      const item: unknown = node.items[segment]
      if (!(isScalar(item) || isMap(item) || isSeq(item))) break
      if (item.range) best = item.range[0]
      node = item
    } else {
      break
    }
  }
  return best
}

type RawIssue = z.core.$ZodRawIssue

function describeFound(input: unknown): string {
  if (input === null) return 'nothing'
  if (typeof input === 'string') return `the text "${input.length > 40 ? `${input.slice(0, 40)}…` : input}"`
  if (typeof input === 'number') return `the number ${input}`
  if (typeof input === 'boolean') return String(input)
  if (Array.isArray(input)) return 'a list'
  if (typeof input === 'object') return 'a set of fields'
  return typeof input
}

const EXPECTED_WORDS: Record<string, string> = {
  string: 'text',
  number: 'a number',
  int: 'a whole number',
  boolean: 'true or false',
  object: 'a set of fields ("name: value" lines)',
  array: 'a list (lines starting with "- ")',
}

/** Plain-language messages for zod's generic issues; messages written in the schema are kept. */
function plainMessage(raw: RawIssue): string | undefined {
  switch (raw.code) {
    case 'invalid_type': {
      if (raw.input === undefined) return 'this field is required'
      const expected = EXPECTED_WORDS[raw.expected] ?? raw.expected
      return `should be ${expected}, not ${describeFound(raw.input)}`
    }
    case 'unrecognized_keys': {
      const inst: unknown = raw.inst
      const shape =
        typeof inst === 'object' && inst !== null && 'shape' in inst ? (inst as { shape: unknown }).shape : undefined
      const allowed = typeof shape === 'object' && shape !== null ? Object.keys(shape) : []
      const keys = raw.keys.map((k) => `"${k}"`).join(', ')
      const hint = allowed.length > 0 ? `; the fields allowed here are ${allowed.join(', ')}` : ''
      return `unknown field ${keys} (check the spelling)${hint}`
    }
    case 'invalid_value':
      return `should be one of ${raw.values.map((v) => JSON.stringify(v)).join(', ')}, not ${describeFound(raw.input)}`
    case 'too_small':
      if (raw.origin === 'array') return `needs at least ${String(raw.minimum)} entr${raw.minimum === 1 ? 'y' : 'ies'}`
      if (raw.origin === 'string') return 'must not be empty'
      return `should be ${raw.inclusive ? 'at least' : 'greater than'} ${String(raw.minimum)}`
    case 'too_big':
      if (raw.origin === 'array') return `has more than ${String(raw.maximum)} entries`
      if (raw.origin === 'string') return `is longer than ${String(raw.maximum)} characters`
      return `should be ${raw.inclusive ? 'at most' : 'less than'} ${String(raw.maximum)}`
    default:
      return undefined
  }
}

/**
 * Parses and validates a module source.
 *
 * @param source - the whole module: front matter and Markdown body
 * @param name - the module's name or slug, used at the start of every message
 * @returns the validated front matter (defaults filled in) and the body, or the list of problems
 */
export function parseModuleSource(source: string, name: string): ParsedModule {
  if (utf8ByteLength(source) > MAX_SOURCE_BYTES) {
    return {
      ok: false,
      errors: [
        moduleIssue(
          name,
          '',
          'the module is larger than 1 MB (1 048 576 bytes of UTF-8); split it into smaller modules',
        ),
      ],
    }
  }
  const normalised = source.replace(/^\uFEFF/, '').replace(/\r\n?/g, '\n')
  const split = splitFrontMatter(normalised)
  if (typeof split === 'string') return { ok: false, errors: [moduleIssue(name, '', split, 1)] }

  const fail = (errors: ModuleIssue[], title?: unknown): ParsedModule => ({
    ok: false,
    errors,
    body: split.body,
    bodyLine: split.bodyLine,
    // A title that breaks the title rule (a line break, 300 characters) is not shown either.
    ...(ModuleTitleSchema.safeParse(title).success ? { title: (title as string).trim() } : {}),
  })

  const lineCounter = new LineCounter()
  const doc = parseDocument(split.yaml, { lineCounter, prettyErrors: false, uniqueKeys: true })
  const toLine = (offset: number | undefined) =>
    offset === undefined ? undefined : lineCounter.linePos(offset).line + split.yamlLine - 1

  const yamlProblems = [...doc.errors, ...doc.warnings]
  if (yamlProblems.length > 0) {
    return fail(
      yamlProblems.map((e) => {
        const line = toLine(e.pos[0])
        return moduleIssue(name, '', `the YAML cannot be read at line ${line ?? '?'}: ${e.message}`, line)
      }),
    )
  }

  let data: unknown
  try {
    data = doc.toJS({ maxAliasCount: 100 })
  } catch (error) {
    return fail([moduleIssue(name, '', `the YAML cannot be read: ${(error as Error).message}`, split.yamlLine)])
  }
  if (data === null || data === undefined) {
    return fail([moduleIssue(name, '', 'the front matter is empty; it needs at least a title', split.yamlLine)])
  }
  if (typeof data !== 'object' || Array.isArray(data)) {
    return fail([
      moduleIssue(
        name,
        '',
        'the front matter must be a set of "name: value" lines (title, due, assignment, …)',
        split.yamlLine,
      ),
    ])
  }

  const lineOf = (path: readonly (string | number)[]) => toLine(offsetOf(doc, path))
  const parsed = FrontMatterSchema.safeParse(data, { error: (raw) => plainMessage(raw) })
  if (!parsed.success) {
    return fail(
      parsed.error.issues.map((i) => {
        const path = i.path.filter((p): p is string | number => typeof p !== 'symbol')
        const at = i.code === 'unrecognized_keys' && i.keys[0] !== undefined ? [...path, i.keys[0]] : path
        return moduleIssue(name, formatPath(path), i.message, lineOf(at))
      }),
      (data as { title?: unknown }).title,
    )
  }
  return { ok: true, frontMatter: parsed.data, body: split.body, bodyLine: split.bodyLine, lineOf }
}
