/**
 * Photographs in an assignment (`assignment.images`): a hand-in may carry pictures of the jet
 * (schlieren or shadowgraph) on which the student marks the scale, the exit plane, the ends of the
 * shock cells and the Mach disk (shared/images/jet-marks.ts). Each photograph gives the expressions
 * its measured distances, in metres, under names made from its key:
 *
 * - `<key>_cell_spacing`: the mean shock-cell spacing;
 * - `<key>_mach_disk`: the exit plane to the Mach disk (NaN when it is not marked);
 * - `<key>_cell_count`: how many cell ends were marked.
 *
 * The moment the photograph was taken is a measurement the student types (`takenAt`, a time into the
 * run log), so the expected values can read the logged pressures at that moment with `interp`.
 */
import { z } from 'zod'
import { MAX_CELL_ENDS } from '../images/jet-marks'
import { KeySchema, LabelSchema } from './spec-names'

/** Most photographs one assignment asks for. */
export const MAX_IMAGES = 4

/** The expression names one photograph adds, from its key. */
export function imageNames(key: string): { cellSpacing: string; machDisk: string; cellCount: string } {
  return { cellSpacing: `${key}_cell_spacing`, machDisk: `${key}_mach_disk`, cellCount: `${key}_cell_count` }
}

const count = (what: string) =>
  z
    .number()
    .int(`${what} must be a whole number`)
    .min(0, `${what} must be 0 or more`)
    .max(MAX_CELL_ENDS, `${what} must be at most ${MAX_CELL_ENDS}`)

export const ImageSpecSchema = z
  .strictObject({
    key: KeySchema,
    label: LabelSchema,
    /** What the student must mark, in plain words, shown above the photograph. */
    instructions: z.string().trim().max(1000, 'instructions have at most 1000 characters').optional(),
    /** Fewest and most cell ends. */
    cells: z.strictObject({ min: count('cells.min'), max: count('cells.max') }).default({ min: 1, max: 8 }),
    machDisk: z
      .enum(['required', 'optional', 'none'], { error: 'machDisk is one of required, optional, none' })
      .default('optional'),
    /** A length measurement whose value is the scale's known length by default (the exit diameter). */
    scaleFrom: KeySchema.optional(),
    /** A time measurement: when, in the run log's time, the photograph was taken. */
    takenAt: KeySchema.optional(),
    /**
     * The results whose expected values are the theory's distances for this photograph (a length
     * each): the feedback report and the pages set them beside the measured ones.
     */
    theory: z.strictObject({ cellSpacing: KeySchema.optional(), machDisk: KeySchema.optional() }).optional(),
  })
  .superRefine((spec, ctx) => {
    if (spec.cells.min > spec.cells.max) {
      ctx.addIssue({
        code: 'custom',
        path: ['cells', 'max'],
        message: `cells.max (${spec.cells.max}) is below cells.min (${spec.cells.min})`,
      })
    }
  })

export type ImageSpec = z.output<typeof ImageSpecSchema>
