/**
 * The printed reports' text and page primitives: the palette, writing text in a role's fonts (with
 * subset fonts switched mid-string), measuring it, headings, paragraphs and page breaks. Shared by the
 * sections of the feedback report (./feedback-pdf.ts, ./photo-section.ts).
 * https://pdfkit.org/docs/text.html
 */
import { fontRuns, fontStacks } from './fonts'
import type { FontRole } from './fonts'

// Colours of the app's palette (src/assets/main.css).
export const INK = '#1e2a44'
export const INK_700 = '#3b4d74'
export const TEXT = '#1f1d1a'
export const MUTED = '#5d574c'
export const RULE = '#d2cabb'
export const PAPER_DEEP = '#f3efe7'
export const COPPER = '#8c3f1e'
export const SPAN = '#2c62c9'
export type TextOptions = PDFKit.Mixins.TextOptions
export type Doc = PDFKit.PDFDocument

/** Writes text in a role's fonts, switching subset fonts mid-string where a character needs it. */
export function put(
  doc: Doc,
  role: FontRole,
  size: number,
  text: string,
  x?: number,
  y?: number,
  opts: TextOptions = {},
): void {
  const runs = fontRuns(text, role)
  if (runs.length === 0) return
  runs.forEach((r, i) => {
    doc.font(r.font).fontSize(size)
    const continued = i < runs.length - 1
    if (i > 0) doc.text(r.text, { continued })
    else if (x === undefined || y === undefined) doc.text(r.text, { ...opts, continued })
    else doc.text(r.text, x, y, { ...opts, continued })
  })
}

export function widthOf(doc: Doc, role: FontRole, size: number, text: string): number {
  let w = 0
  for (const r of fontRuns(text, role)) w += doc.font(r.font).fontSize(size).widthOfString(r.text)
  return w
}

/** Height of wrapped text, measured in the role's main font (other subsets differ little in width). */
export function heightOf(
  doc: Doc,
  role: FontRole,
  size: number,
  text: string,
  width: number,
  opts: TextOptions = {},
): number {
  const plain = fontRuns(text, role)
    .map((r) => r.text)
    .join('')
  return doc
    .font(fontStacks()[role][0]!.name)
    .fontSize(size)
    .heightOfString(plain, { ...opts, width })
}

export const bottomOf = (doc: Doc) => doc.page.height - doc.page.margins.bottom
export const contentWidth = (doc: Doc) => doc.page.width - doc.page.margins.left - doc.page.margins.right

/** A new page when `height` does not fit below the cursor. */
export function ensure(doc: Doc, height: number): void {
  if (doc.y + height > bottomOf(doc)) doc.addPage()
}

export function heading(doc: Doc, text: string, keepWith = 60): void {
  doc.moveDown(0.8)
  ensure(doc, 24 + keepWith)
  const x = doc.page.margins.left
  put(doc, 'sans-bold', 12.5, text, x, doc.y, { lineBreak: false })
  doc.y += 17
  doc
    .moveTo(x, doc.y)
    .lineTo(x + contentWidth(doc), doc.y)
    .lineWidth(0.6)
    .strokeColor(RULE)
    .stroke()
  doc.y += 7
  doc.x = x
}

export function paragraph(doc: Doc, role: FontRole, size: number, text: string, colour = TEXT, indent = 0): void {
  const x = doc.page.margins.left + indent
  doc.fillColor(colour)
  put(doc, role, size, text, x, doc.y, { width: contentWidth(doc) - indent, lineGap: 1.5 })
  doc.x = doc.page.margins.left
  doc.fillColor(TEXT)
}
