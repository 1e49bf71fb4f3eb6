import Papa from 'papaparse'
import type { GradebookQuery } from '../../shared/schemas/grades'
import type { Database } from '../db/client'
import type { CourseEnrollment } from '../repositories/enrollments'
import { courseTimeZone } from '../repositories/modules'
import { gradebook } from './grades-service'

/**
 * A text cell a spreadsheet would read as a formula (or as a control character that starts one)
 * gets a leading apostrophe, so it is shown as text and never run.
 * https://owasp.org/www-community/attacks/CSV_Injection
 */
export function neutraliseCell(text: string): string {
  return /^[=+\-@\t\r]/.test(text) ? `'${text}` : text
}

const round = (x: number, digits: number) => Number(x.toFixed(digits))

/**
 * The gradebook as CSV, same scope and filters as the screen: one row per student with e-mail,
 * name, section, lab group, each module's counted points (empty when none) and the total in
 * percent. Text cells are neutralised; the numbers are our own and stay numbers.
 */
export async function gradebookCsv(
  db: Database,
  e: CourseEnrollment,
  q: GradebookQuery,
): Promise<{ filename: string; csv: string }> {
  const [book, course] = await Promise.all([gradebook(db, e, q), courseTimeZone(db, e.courseId)])
  const header = [
    'email',
    'name',
    'section',
    'group',
    ...book.modules.map((m) => `${m.title} (points)`),
    'total %',
  ].map(neutraliseCell)
  const rows = book.students.map((s) => [
    neutraliseCell(s.email),
    neutraliseCell(s.name),
    neutraliseCell(s.sectionName ?? ''),
    neutraliseCell(s.labGroupName ?? ''),
    ...book.modules.map((m) => {
      const c = s.cells[String(m.id)]
      return c ? round(c.points, 2) : ''
    }),
    s.totalPercent === null ? '' : round(s.totalPercent, 1),
  ])
  // The byte-order mark lets spreadsheet programs read names with accents as UTF-8.
  const csv = '\uFEFF' + Papa.unparse({ fields: header, data: rows }, { newline: '\r\n' })
  const code = course.code.replace(/[^A-Za-z0-9_-]+/g, '-').replace(/^-+|-+$/g, '') || 'course'
  const day = new Date().toISOString().slice(0, 10)
  return { filename: `gradebook-${code}-${day}.csv`, csv }
}
