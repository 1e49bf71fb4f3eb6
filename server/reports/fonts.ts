/**
 * The fonts of the printed reports: the app's own shipped fonts (the @fontsource packages), embedded
 * into each PDF as TrueType subsets. Never the PDF standard 14 fonts.
 *
 * - serif (Noto Serif) for course text: titles, flag explanations, staff comments;
 * - sans (Source Sans 3) for labels, headings and the interface words;
 * - mono (JetBrains Mono) for every number, so columns of figures line up.
 *
 * Each family ships as subset files (latin, latin-ext, greek, …). A string is cut into runs, each
 * set in the first file of its role's stack that has a glyph for the character; the glyphs are
 * read from each file's own character map, because a subset's declared unicode-range promises more
 * than the font draws (Noto Serif's "math" file has superscript digits and Greek but no ≤, → or √).
 * Common symbols none of the files draws are written out in ASCII (≤ → "<="); anything else
 * becomes "?". The .woff files are used: fontkit reads WOFF2 too, but its subsetter fails on WOFF2
 * composite glyphs (letters such as ř), which WOFF does not.
 */
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { inflateSync } from 'node:zlib'

const require = createRequire(import.meta.url)

type Family = 'noto-serif' | 'source-sans-3' | 'jetbrains-mono'
type Subset = 'latin' | 'latin-ext' | 'greek' | 'math'

/** What a piece of text is: course text, a label, or a number. */
export type FontRole = 'serif' | 'serif-bold' | 'sans' | 'sans-semibold' | 'sans-bold' | 'mono' | 'mono-bold'

interface Face {
  /** The name it is registered under in a PDF document, e.g. "noto-serif-latin-400". */
  name: string
  bytes: Buffer
  has: (codePoint: number) => boolean
}

const ROLES: Record<FontRole, { family: Family; weight: number }> = {
  serif: { family: 'noto-serif', weight: 400 },
  'serif-bold': { family: 'noto-serif', weight: 700 },
  sans: { family: 'source-sans-3', weight: 400 },
  'sans-semibold': { family: 'source-sans-3', weight: 600 },
  'sans-bold': { family: 'source-sans-3', weight: 700 },
  mono: { family: 'jetbrains-mono', weight: 400 },
  'mono-bold': { family: 'jetbrains-mono', weight: 700 },
}

const OWN_SUBSETS: Subset[] = ['latin', 'latin-ext', 'greek']

/** Symbols none of the shipped files draws, in words or ASCII a reader understands. */
const SUBSTITUTES: Record<string, string> = {
  '≤': '<=',
  '≥': '>=',
  '≠': '!=',
  '≈': '~',
  '∼': '~',
  '≃': '~',
  '→': '->',
  '←': '<-',
  '↔': '<->',
  '⇒': '=>',
  '∞': 'infinity',
  '√': 'sqrt',
  '∆': 'Δ',
  '∑': 'Σ',
  '∏': 'Π',
  '∙': '·',
  '⋅': '·',
  '∕': '/',
  '∓': '-/+',
  '‐': '-',
  '‑': '-',
  '‒': '-',
  '‰': ' per mille',
}

/**
 * The code points a WOFF 1.0 font maps to a glyph, from its cmap table (format 4 or 12).
 * https://www.w3.org/TR/WOFF/#TableDirectory, https://learn.microsoft.com/en-us/typography/opentype/spec/cmap
 */
export function woffCoverage(woff: Buffer): (codePoint: number) => boolean {
  if (woff.toString('latin1', 0, 4) !== 'wOFF') throw new Error('not a WOFF 1.0 font')
  const numTables = woff.readUInt16BE(12)
  let cmap: Buffer | null = null
  for (let i = 0; i < numTables; i++) {
    const e = 44 + i * 20
    if (woff.toString('latin1', e, e + 4) !== 'cmap') continue
    const offset = woff.readUInt32BE(e + 4)
    const compLength = woff.readUInt32BE(e + 8)
    const origLength = woff.readUInt32BE(e + 12)
    const raw = woff.subarray(offset, offset + compLength)
    cmap = compLength < origLength ? inflateSync(raw) : raw
  }
  if (!cmap) throw new Error('the font has no cmap table')
  const records: { platform: number; encoding: number; offset: number }[] = []
  for (let i = 0; i < cmap.readUInt16BE(2); i++) {
    const r = 4 + i * 8
    records.push({
      platform: cmap.readUInt16BE(r),
      encoding: cmap.readUInt16BE(r + 2),
      offset: cmap.readUInt32BE(r + 4),
    })
  }
  const ranges: [number, number][] = []
  const pick = (platform: number, encoding: number, format: number) =>
    records.find((r) => r.platform === platform && r.encoding === encoding && cmap!.readUInt16BE(r.offset) === format)
  const full = pick(3, 10, 12) ?? pick(0, 4, 12)
  const bmp = pick(3, 1, 4) ?? pick(0, 3, 4)
  if (full) {
    const n = cmap.readUInt32BE(full.offset + 12)
    for (let i = 0; i < n; i++) {
      const g = full.offset + 16 + i * 12
      ranges.push([cmap.readUInt32BE(g), cmap.readUInt32BE(g + 4)])
    }
  } else if (bmp) {
    const t = bmp.offset
    const segs = cmap.readUInt16BE(t + 6) / 2
    const ends = t + 14
    const starts = ends + segs * 2 + 2
    const deltas = starts + segs * 2
    const rangeOffsets = deltas + segs * 2
    for (let s = 0; s < segs; s++) {
      const start = cmap.readUInt16BE(starts + s * 2)
      const end = cmap.readUInt16BE(ends + s * 2)
      const delta = cmap.readInt16BE(deltas + s * 2)
      const ro = cmap.readUInt16BE(rangeOffsets + s * 2)
      for (let c = start; c <= end && c !== 0xffff; c++) {
        let glyph: number
        if (ro === 0) glyph = (c + delta) & 0xffff
        else {
          const at = rangeOffsets + s * 2 + ro + (c - start) * 2
          const raw = cmap.readUInt16BE(at)
          glyph = raw === 0 ? 0 : (raw + delta) & 0xffff
        }
        if (glyph === 0) continue
        const last = ranges[ranges.length - 1]
        if (last && last[1] === c - 1) last[1] = c
        else ranges.push([c, c])
      }
    }
  } else {
    throw new Error('the font has no Unicode cmap subtable')
  }
  return (cp) => {
    let lo = 0
    let hi = ranges.length - 1
    while (lo <= hi) {
      const mid = (lo + hi) >> 1
      const [a, b] = ranges[mid]!
      if (cp < a) hi = mid - 1
      else if (cp > b) lo = mid + 1
      else return true
    }
    return false
  }
}

/**
 * The TrueType/OpenType font inside a WOFF 1.0 file: each table inflated with Node's zlib and laid
 * out again as an sfnt (header, table directory, 4-byte aligned tables). Done once per process, so
 * each document's subsetter reads plain tables instead of inflating every table again in
 * JavaScript (which was most of a report's rendering time).
 * https://www.w3.org/TR/WOFF/#OverallStructure
 */
export function woffToSfnt(woff: Buffer): Buffer {
  if (woff.toString('latin1', 0, 4) !== 'wOFF') throw new Error('not a WOFF 1.0 font')
  const flavor = woff.readUInt32BE(4)
  const numTables = woff.readUInt16BE(12)
  const tables: { tag: string; checksum: number; data: Buffer }[] = []
  for (let i = 0; i < numTables; i++) {
    const e = 44 + i * 20
    const offset = woff.readUInt32BE(e + 4)
    const compLength = woff.readUInt32BE(e + 8)
    const origLength = woff.readUInt32BE(e + 12)
    const raw = woff.subarray(offset, offset + compLength)
    const data = compLength < origLength ? inflateSync(raw) : raw
    if (data.length !== origLength)
      throw new Error(`table ${woff.toString('latin1', e, e + 4)}: ${data.length} bytes, expected ${origLength}`)
    tables.push({ tag: woff.toString('latin1', e, e + 4), checksum: woff.readUInt32BE(e + 16), data })
  }
  let searchRange = 1
  let entrySelector = 0
  while (searchRange * 2 <= numTables) {
    searchRange *= 2
    entrySelector += 1
  }
  const header = Buffer.alloc(12 + 16 * numTables)
  header.writeUInt32BE(flavor, 0)
  header.writeUInt16BE(numTables, 4)
  header.writeUInt16BE(searchRange * 16, 6)
  header.writeUInt16BE(entrySelector, 8)
  header.writeUInt16BE(numTables * 16 - searchRange * 16, 10)
  const parts: Buffer[] = [header]
  let at = header.length
  tables.forEach((t, i) => {
    const d = 12 + i * 16
    header.write(t.tag, d, 4, 'latin1')
    header.writeUInt32BE(t.checksum, d + 4)
    header.writeUInt32BE(at, d + 8)
    header.writeUInt32BE(t.data.length, d + 12)
    const padded = (t.data.length + 3) & ~3
    parts.push(t.data, Buffer.alloc(padded - t.data.length))
    at += padded
  })
  return Buffer.concat(parts)
}

const faces = new Map<string, Face>()

function face(family: Family, subset: Subset, weight: number): Face {
  const name = `${family}-${subset}-${weight}`
  let f = faces.get(name)
  if (!f) {
    const woff = readFileSync(require.resolve(`@fontsource/${family}/files/${family}-${subset}-${weight}-normal.woff`))
    f = { name, bytes: woffToSfnt(woff), has: woffCoverage(woff) }
    faces.set(name, f)
  }
  return f
}

let stacks: Record<FontRole, Face[]> | null = null

/** Each role's faces in the order they are tried; Noto Serif's math file closes every stack. */
export function fontStacks(): Record<FontRole, Face[]> {
  if (stacks) return stacks
  const out = {} as Record<FontRole, Face[]>
  for (const [role, { family, weight }] of Object.entries(ROLES) as [FontRole, { family: Family; weight: number }][]) {
    out[role] = [
      ...OWN_SUBSETS.map((s) => face(family, s, weight)),
      face('noto-serif', 'math', weight >= 600 ? 700 : 400),
    ]
  }
  stacks = out
  return out
}

/** Every face with its sfnt bytes, to register in a document (each file is read once per process). */
export function allFaces(): { name: string; bytes: Buffer }[] {
  const seen = new Map<string, Face>()
  for (const list of Object.values(fontStacks())) for (const f of list) seen.set(f.name, f)
  return [...seen.values()].map((f) => ({ name: f.name, bytes: f.bytes }))
}

/** The font a document starts with, so pdfkit never loads a standard 14 font as its default. */
export function defaultFont(): Buffer {
  return face('source-sans-3', 'latin', 400).bytes
}

/** A piece of text and the registered font it is set in. */
export interface FontRun {
  font: string
  text: string
}

/**
 * Cuts text into runs by the file that has each character's glyph. Spaces and line breaks join the
 * open run; other control characters become spaces; a character no file draws becomes its ASCII
 * stand-in or "?".
 *
 * @example
 * fontRuns('Dvořák ≤ 3', 'serif')
 * // → [{ font: 'noto-serif-latin-400', text: 'Dvo' }, { font: 'noto-serif-latin-ext-400', text: 'ř' },
 * //    { font: 'noto-serif-latin-400', text: 'ák <= 3' }]
 */
export function fontRuns(text: string, role: FontRole): FontRun[] {
  const stack = fontStacks()[role]
  const primary = stack[0]!
  const runs: FontRun[] = []
  const add = (font: string, out: string, joins: boolean) => {
    const last = runs[runs.length - 1]
    if (last && (last.font === font || joins)) last.text += out
    else runs.push({ font, text: out })
  }
  for (const ch of text.normalize('NFC')) {
    const cp = ch.codePointAt(0)!
    if (ch === ' ' || ch === '\n') {
      // Joins the open run when its font has a space (the math file may not).
      const last = runs[runs.length - 1]
      add(primary.name, ch, !!last && !!faces.get(last.font)?.has(0x20))
      continue
    }
    if (cp < 0x20 || (cp >= 0x7f && cp < 0xa0)) {
      add(primary.name, ' ', true)
      continue
    }
    const f = stack.find((s) => s.has(cp))
    if (f) {
      add(f.name, ch, false)
      continue
    }
    const sub = SUBSTITUTES[ch]
    if (sub) {
      for (const c of sub) {
        const g = stack.find((s) => s.has(c.codePointAt(0)!)) ?? primary
        add(g.name, c, false)
      }
    } else {
      add(primary.name, '?', false)
    }
  }
  return runs
}
