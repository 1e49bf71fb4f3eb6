import { describe, expect, it } from 'vitest'
import { feedbackPdfBuffer, niceTicks } from '../../server/reports/feedback-pdf'
import { readFileSync } from 'node:fs'
import { createRequire } from 'node:module'
import { fontRuns, woffToSfnt } from '../../server/reports/fonts'
import { fileSlug } from '../../server/reports/format'
import { markdownToParagraphs } from '../../server/reports/plain-text'
import { reportData } from '../helpers/report-data'
import { pdfFonts, readPdf } from '../helpers/pdf'

const report = reportData

describe('the feedback report layout', () => {
  it('breaks a long checks table and a long comment across pages, repeating the table header and numbering every page', async () => {
    const checks = Array.from({ length: 70 }, (_, i) => ({
      label: `Result number ${i + 1}`,
      unit: 'N*s',
      reported: 100 + i,
      expected: null,
      relError: 0.01,
      tolerance: 3,
      pointsAwarded: 1,
      pointsPossible: 1,
      outcome: 'pass' as const,
      adjusted: false,
    }))
    const words = Array.from({ length: 900 }, (_, i) => `word${i}`).join(' ')
    const pdf = await readPdf(
      await feedbackPdfBuffer(
        report({
          checks,
          comments: [{ author: 'Ines Vallory', at: new Date(), paragraphs: [words, 'Last paragraph.'] }],
        }),
      ),
    )
    expect(pdf.pages).toBeGreaterThanOrEqual(4)
    pdf.pageTexts.forEach((t, i) => expect(t).toContain(`Page ${i + 1} of ${pdf.pages}`))
    // Every row is printed once, and the header opens each page the table runs onto.
    for (const c of checks) expect(pdf.text.split(`${c.label} `).length - 1).toBe(1)
    const tablePages = pdf.pageTexts.filter((t) => /Result number \d+/.test(t))
    expect(tablePages.length).toBeGreaterThan(1)
    for (const t of tablePages) expect(t).toContain('Result Your value Error Tolerance Points Outcome')
    // The comment is whole, in order, and its last paragraph follows it.
    expect(pdf.text).toContain('word0 word1 word2')
    expect(pdf.text).toContain('word898 word899 Last paragraph.')
  })

  it('sizes the checks columns to their content, so short cells such as "< 0.01 %" stay on one line', async () => {
    const base = { unit: 'N*s', tolerance: 2.5, pointsPossible: 2, adjusted: false }
    const checks = [
      {
        ...base,
        label: 'Total impulse',
        reported: 98.2,
        expected: 98.2049,
        relError: 5e-5,
        pointsAwarded: 2,
        outcome: 'pass' as const,
      },
      {
        ...base,
        label: 'Peak thrust',
        reported: 101.5,
        expected: 98.2,
        relError: 0.0336,
        pointsAwarded: 1,
        outcome: 'partial' as const,
      },
      {
        ...base,
        label: 'Burn time',
        reported: 140,
        expected: 98.2,
        relError: 0.4257,
        pointsAwarded: 0.5,
        outcome: 'fail' as const,
        adjusted: true,
      },
    ]
    const pdf = await readPdf(await feedbackPdfBuffer(report({ checks })))
    const lines = pdf.lines.flat()
    const row = (label: string) => lines.find((l) => l.startsWith(`${label} `)) ?? ''
    // Each row is one printed line holding every cell whole.
    expect(row('Total impulse')).toContain('< 0.01 %')
    expect(row('Total impulse')).toMatch(/98\.2 N·s 98\.205 N·s < 0\.01 % ± 2\.5 N·s 2 \/ 2 Passed$/)
    expect(row('Peak thrust')).toMatch(/3\.4 % ± 2\.5 N·s 1 \/ 2 Partial credit$/)
    expect(row('Burn time')).toMatch(/43 % ± 2\.5 N·s 0\.5 \/ 2 \* Failed$/)
    // No line holds a cell's lone tail.
    expect(lines.filter((l) => l === '%' || l === 'credit')).toEqual([])
  })

  it('sets letters beyond Latin-1 in the latin-ext file and writes out symbols the fonts lack', async () => {
    const runs = fontRuns('Dvořák ≤ 3', 'serif')
    expect(runs.map((r) => r.text).join('')).toBe('Dvořák <= 3')
    expect(runs.find((r) => r.text === 'ř')?.font).toBe('noto-serif-latin-ext-400')
    expect(runs[0]!.font).toBe('noto-serif-latin-400')
    // Superscript digits come from Noto Serif's math file, even in the mono role.
    expect(fontRuns('10⁻⁵', 'mono').map((r) => r.font)).toEqual(['jetbrains-mono-latin-400', 'noto-serif-math-400'])
    const bytes = await feedbackPdfBuffer(
      report({ owner: { kind: 'group', name: 'Group Ø', members: ['Anežka Dvořák', 'Łukasz Żmuda'] } }),
    )
    const pdf = await readPdf(bytes)
    expect(pdf.text).toContain('Anežka Dvořák, Łukasz Żmuda')
    expect(pdfFonts(bytes).baseFonts.every((f) => /^[A-Z]{6}\+(NotoSerif|SourceSans3|JetBrainsMono)-/.test(f))).toBe(
      true,
    )
  })
})

describe('staff comments as plain text', () => {
  it('keeps the words, drops the markup, and leaves typed HTML as literal text', () => {
    expect(
      markdownToParagraphs(
        '**Good run.** Check the [log](https://x.example/l).\n\n1. one\n2. two\n\n<script>alert(1)</script>',
      ),
    ).toEqual(['Good run. Check the log (https://x.example/l).', '1. one', '2. two', '<script>alert(1)</script>'])
    expect(markdownToParagraphs('A bare link https://x.example/a and `code`.')).toEqual([
      'A bare link https://x.example/a and code.',
    ])
  })
})

describe('report helpers', () => {
  it('makes safe file names', () => {
    expect(fileSlug('Group A1')).toBe('group-a1')
    expect(fileSlug('Dvořák, Anežka')).toBe('dvorak-anezka')
    expect(fileSlug('../../etc/passwd')).toBe('etc-passwd')
    expect(fileSlug('***')).toBe('report')
  })

  it('picks round tick steps covering the range', () => {
    expect(niceTicks(0, 21.9, 8).ticks).toEqual([0, 5, 10, 15, 20, 25])
    expect(niceTicks(0, 870, 6).ticks).toEqual([0, 200, 400, 600, 800, 1000])
    expect(niceTicks(0, 0, 6).ticks).toEqual([0, 0.2, 0.4, 0.6, 0.8, 1])
  })

  it('unpacks a shipped WOFF font into a TrueType font that fontkit reads with the same glyphs and names', () => {
    const require = createRequire(import.meta.url)
    // fontkit is the font reader pdfkit itself uses (its dependency), so this is what the PDF sees.
    interface Font {
      numGlyphs: number
      postscriptName: string
      glyphForCodePoint(cp: number): { advanceWidth: number }
    }
    const fontkit = require(require.resolve('fontkit', { paths: [require.resolve('pdfkit')] })) as {
      create(b: Buffer): Font
    }
    const woff = readFileSync(require.resolve('@fontsource/noto-serif/files/noto-serif-latin-ext-400-normal.woff'))
    const sfnt = woffToSfnt(woff)
    expect(sfnt.readUInt32BE(0)).toBe(woff.readUInt32BE(4))
    const a = fontkit.create(woff)
    const b = fontkit.create(sfnt)
    expect(b.numGlyphs).toBe(a.numGlyphs)
    expect(b.postscriptName).toBe(a.postscriptName)
    for (const ch of 'Dvořák ŁŽ')
      expect(b.glyphForCodePoint(ch.codePointAt(0)!).advanceWidth).toBe(
        a.glyphForCodePoint(ch.codePointAt(0)!).advanceWidth,
      )
  })
})
