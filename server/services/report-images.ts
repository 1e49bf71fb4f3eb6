/**
 * The photographs of a hand-in as the feedback report prints them: the stored picture, the student's
 * marks, the sheet's label, and the theory's distances beside them.
 *
 * The theory's distances are the expected values of the results the sheet's photograph names in
 * `theory` (cellSpacing, machDisk), converted from the result's unit to metres. They follow the same
 * rule as every expected value in the report: printed only when the sheet shows expected values to
 * students, so a report handed on by staff never shows more than the student's own result page.
 */
import type { ImageSpec } from '../../shared/modules/image-spec'
import type { SubmissionImageView } from '../../shared/schemas/submissions'
import { isUnitSymbol, toSI } from '../../shared/units'
import type { ReportImage } from '../reports/feedback-pdf'

/** What the report needs of a check to read a theory distance from it. */
export interface TheoryCheck {
  key: string
  unit: string
  expected: number | null
}

function expectedMetres(key: string | undefined, checks: readonly TheoryCheck[], showExpected: boolean): number | null {
  if (!showExpected || key === undefined) return null
  const check = checks.find((c) => c.key === key)
  if (!check || check.expected === null || !Number.isFinite(check.expected) || !isUnitSymbol(check.unit)) return null
  return toSI(check.expected, check.unit)
}

/**
 * The report's photographs, in the sheet's order. A photograph whose picture is not among
 * `pictures` is left out (the picture and its marks are stored in one transaction, so this means
 * it was never handed in).
 *
 * @param views - the hand-in's photographs with their marks (SubmissionDetail.images)
 * @param specs - the sheet's `assignment.images` for the hand-in's version
 * @param checks - the hand-in's checks, with their expected values in the result's unit
 * @param showExpected - whether the sheet shows expected values to students
 * @param pictures - the stored pictures' bytes by photograph key
 */
export function reportImages(
  views: readonly SubmissionImageView[],
  specs: readonly ImageSpec[],
  checks: readonly TheoryCheck[],
  showExpected: boolean,
  pictures: ReadonlyMap<string, Buffer>,
): ReportImage[] {
  const order = (key: string) => {
    const i = specs.findIndex((s) => s.key === key)
    return i < 0 ? specs.length : i
  }
  return [...views]
    .sort((a, b) => order(a.key) - order(b.key))
    .flatMap((view) => {
      const bytes = pictures.get(view.key)
      if (!bytes) return []
      const spec = specs.find((s) => s.key === view.key)
      return [
        {
          label: spec?.label ?? view.key,
          contentType: view.contentType,
          width: view.width,
          height: view.height,
          bytes,
          marks: view.marks,
          expected: {
            cellSpacing: expectedMetres(spec?.theory?.cellSpacing, checks, showExpected),
            machDisk: expectedMetres(spec?.theory?.machDisk, checks, showExpected),
          },
        },
      ]
    })
}
