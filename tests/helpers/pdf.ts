import yauzl from 'yauzl'

// pdf.js 5.6 is the newest release that supports Node 20 (engines: >=20.19); 6.x needs Node 22.
const pdfjs = await import('pdfjs-dist/legacy/build/pdf.mjs')

/** Whitespace collapsed to single spaces, so wrapped lines compare with the text that was wrapped. */
export const squash = (s: string) => s.replace(/\s+/g, ' ').trim()

export interface PdfRead {
  pages: number
  /** Each page's text as pdf.js extracts it, whitespace collapsed. */
  pageTexts: string[]
  /** All pages' text, whitespace collapsed. */
  text: string
  /**
   * Per page, the printed lines top to bottom: pieces of text on one baseline (within 3 pt, so the
   * cells of one table row count as one line) joined left to right with a space. A wrapped cell
   * shows as its pieces on two lines.
   */
  lines: string[][]
  /** Per page, how many times each drawing operator occurs (by pdf.js's OPS names). */
  operators: Record<string, number>[]
  /** Per page, the length of the longest path pdf.js built (numbers in its path data). */
  longestPath: number[]
}

/** The size of a constructPath's path data, wherever this pdf.js version keeps it in the arguments. */
function pathSize(args: unknown): number {
  if (ArrayBuffer.isView(args)) return (args as Float32Array).length
  if (Array.isArray(args)) return Math.max(0, ...args.map(pathSize))
  return 0
}

const OP_NAMES = new Map(Object.entries(pdfjs.OPS).map(([name, code]) => [code as number, name]))

/** Reads a PDF with pdf.js (the legacy build, which runs in Node): text and drawing operators of every page. */
export async function readPdf(bytes: Buffer): Promise<PdfRead> {
  const task = pdfjs.getDocument({
    data: new Uint8Array(bytes),
    useSystemFonts: false,
    disableFontFace: true,
    verbosity: 0,
  })
  const doc = await task.promise
  const pageTexts: string[] = []
  const operators: Record<string, number>[] = []
  const longestPath: number[] = []
  const lines: string[][] = []
  for (let i = 1; i <= doc.numPages; i++) {
    const page = await doc.getPage(i)
    const content = await page.getTextContent()
    lines.push(textLines(content.items))
    // Items of one line follow each other; hasEOL marks a line end (a wrapped line or a new paragraph).
    const text = content.items.map((item) => ('str' in item ? item.str + (item.hasEOL ? ' ' : '') : '')).join('')
    pageTexts.push(squash(text))
    const list = await page.getOperatorList()
    const counts: Record<string, number> = {}
    let longest = 0
    list.fnArray.forEach((fn, k) => {
      const name = OP_NAMES.get(fn) ?? String(fn)
      counts[name] = (counts[name] ?? 0) + 1
      if (fn === pdfjs.OPS.constructPath) longest = Math.max(longest, pathSize(list.argsArray[k]))
    })
    operators.push(counts)
    longestPath.push(longest)
  }
  await task.destroy()
  return { pages: doc.numPages, pageTexts, text: squash(pageTexts.join(' ')), operators, longestPath, lines }
}

/** Text items grouped into lines by their baseline (PDF y grows upwards), each line read left to right. */
function textLines(items: readonly object[]): string[] {
  const pieces = items
    .filter((it): it is { str: string; transform: number[] } => 'str' in it && 'transform' in it)
    .filter((it) => it.str.trim() !== '')
    .map((it) => ({ text: it.str.trim(), x: it.transform[4]!, y: it.transform[5]! }))
    .sort((a, b) => b.y - a.y)
  const rows: { y: number; parts: { text: string; x: number }[] }[] = []
  for (const p of pieces) {
    const row = rows.find((r) => Math.abs(r.y - p.y) <= 3)
    if (row) row.parts.push(p)
    else rows.push({ y: p.y, parts: [p] })
  }
  return rows.map((r) =>
    r.parts
      .sort((a, b) => a.x - b.x)
      .map((p) => p.text)
      .join(' '),
  )
}

/** The fonts a PDF names: every /BaseFont and how many embedded font programs it carries. */
export function pdfFonts(bytes: Buffer): { baseFonts: string[]; fontFiles: number } {
  const raw = bytes.toString('latin1')
  const baseFonts = [...new Set([...raw.matchAll(/\/BaseFont\s*\/([^\s/<>[\]()]+)/g)].map((m) => m[1]!))]
  const fontFiles = [...raw.matchAll(/\/FontFile[23]?\s+\d+\s+0\s+R/g)].length
  return { baseFonts, fontFiles }
}

/** A zip's entries and their bytes, read back with yauzl. */
export function readZip(bytes: Buffer): Promise<{ name: string; bytes: Buffer }[]> {
  return new Promise((resolve, reject) => {
    yauzl.fromBuffer(bytes, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return reject(err ?? new Error('not a zip'))
      const out: { name: string; bytes: Buffer }[] = []
      zip.on('error', reject)
      zip.on('end', () => resolve(out))
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e || !stream) return reject(e ?? new Error(`cannot read ${entry.fileName}`))
          const chunks: Buffer[] = []
          stream.on('data', (c: Buffer) => chunks.push(c))
          stream.on('error', reject)
          stream.on('end', () => {
            out.push({ name: entry.fileName, bytes: Buffer.concat(chunks) })
            zip.readEntry()
          })
        })
      })
      zip.readEntry()
    })
  })
}

/** The image XObjects a PDF holds: each one's pixel size and filter (DCTDecode for a JPEG as it came). */
export function pdfImages(bytes: Buffer): { width: number; height: number; filter: string | null }[] {
  const raw = bytes.toString('latin1')
  return [...raw.matchAll(/<<((?:(?!>>)[\s\S])*?\/Subtype\s*\/Image(?:(?!>>)[\s\S])*)>>/g)].map((m) => {
    const dict = m[1]!
    const num = (key: string) => Number(new RegExp(`/${key}\\s+(\\d+)`).exec(dict)?.[1] ?? Number.NaN)
    return { width: num('Width'), height: num('Height'), filter: /\/Filter\s*\/(\w+)/.exec(dict)?.[1] ?? null }
  })
}
