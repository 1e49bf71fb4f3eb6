import { checkMarks, type JetMarks } from '../../shared/images/jet-marks'
import type { ModuleFrontMatter } from '../../shared/modules/schema'
import type { SubmissionFieldIssue, SubmissionPayload } from '../../shared/schemas/submissions'
import { preparePhoto, type PreparedPhoto } from '../images/photo'
import type { UploadedTable } from './hand-in-validation'

/** A photograph of a hand-in, checked and re-encoded, with the marks the student set on it. */
export interface HandInPhoto {
  key: string
  photo: PreparedPhoto
  marks: JetMarks
}

/**
 * The photographs a sheet asks for (`assignment.images`): each file `photo:<key>` is checked from
 * its bytes and re-encoded (server/images/photo.ts, which throws `photo_refused` for a file that is
 * not a usable picture), and its marks (`payload.images[<key>]`) are checked against the picture's
 * size and the sheet's rules. Problems with the marks come back as issues naming the photograph and
 * the mark (`images.<key>.cell-end.2`), to be refused with the rest of the hand-in's problems.
 *
 * The pictures are decoded one after another: at most one decoded photograph per hand-in is in
 * memory at a time, and the decoding runs on libuv's thread pool, not the request thread.
 */
export async function prepareHandInPhotos(
  fm: ModuleFrontMatter,
  payload: SubmissionPayload,
  uploads: readonly UploadedTable[],
): Promise<{ photos: HandInPhoto[]; issues: SubmissionFieldIssue[] }> {
  const specs = fm.assignment?.images ?? []
  const issues: SubmissionFieldIssue[] = []
  const photos: HandInPhoto[] = []
  for (const key of Object.keys(payload.images ?? {})) {
    if (!specs.some((s) => s.key === key)) {
      issues.push({ field: `images.${key}`, message: `This sheet asks for no photograph "${key}"; remove its marks.` })
    }
  }
  for (const spec of specs) {
    const field = `photo:${spec.key}`
    const upload = uploads.find((u) => u.field === field)
    const marks = payload.images?.[spec.key]
    if (!upload) issues.push({ field, message: `${spec.label}: choose the photograph to hand in.` })
    if (!marks) {
      issues.push({
        field: `images.${spec.key}`,
        message: `${spec.label}: mark the scale, the exit plane and the cell ends on the photograph.`,
      })
    }
    if (!upload) continue
    const photo = await preparePhoto(upload.bytes, field, spec.label)
    if (!marks) continue
    const problems = checkMarks(marks, photo, { cells: spec.cells, machDisk: spec.machDisk })
    for (const p of problems) {
      issues.push({
        field: `images.${spec.key}.${p.mark}${p.index === undefined ? '' : `.${p.index}`}`,
        message: `${spec.label}: ${p.message}.`,
      })
    }
    if (problems.length === 0) photos.push({ key: spec.key, photo, marks })
  }
  return { photos, issues }
}
