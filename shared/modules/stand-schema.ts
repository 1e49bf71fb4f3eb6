/**
 * Front matter for lab sheets that run on a test stand: how many stand runs a lab group may book
 * (`standRuns`), the pre-run checklist staff walk the group through (`checklist`), and whether a
 * hand-in needs a signed-off run (`requiresSignedRun`). The checklist supports the institution's own
 * procedures; it does not replace them.
 */
import { z } from 'zod'

/** Most items one checklist has. */
export const MAX_CHECKLIST_ITEMS = 40

export const ChecklistItemSchema = z.strictObject({
  key: z
    .string()
    .max(40, 'a key has at most 40 characters')
    .regex(
      /^[a-z][a-z0-9-]*$/,
      'a checklist key starts with a lower-case letter and has only lower-case letters, digits and - (for example leak-check)',
    ),
  text: z
    .string()
    .trim()
    .min(1, 'the item needs its words (what is checked)')
    .max(300, 'a checklist item has at most 300 characters'),
  /** Only staff (a TA or the instructor) may tick it. */
  staff: z.boolean().default(false),
  /** A hold point: the run does not go on, and cannot be signed off, until it is ticked. */
  hold: z.boolean().default(false),
})

export type ChecklistItem = z.output<typeof ChecklistItemSchema>

export const ChecklistSchema = z
  .array(ChecklistItemSchema)
  .min(1, 'a checklist has at least one item')
  .max(MAX_CHECKLIST_ITEMS, `a checklist has at most ${MAX_CHECKLIST_ITEMS} items`)
  .superRefine((items, ctx) => {
    const seen = new Set<string>()
    items.forEach((item, i) => {
      if (seen.has(item.key)) {
        ctx.addIssue({ code: 'custom', path: [i, 'key'], message: `the key "${item.key}" is used twice` })
      }
      seen.add(item.key)
    })
  })

/** The stand fields of the front matter, merged into FrontMatterSchema. */
export const standFrontMatter = {
  /** How many stand runs one lab group may book for this sheet; 0: the sheet is not run on a stand. */
  standRuns: z
    .number()
    .int('must be a whole number')
    .min(0, 'must be 0 or more')
    .max(20, 'must be at most 20')
    .default(0),
  checklist: ChecklistSchema.optional(),
  /** A hand-in is accepted only against a signed-off run of the student's lab group. */
  requiresSignedRun: z.boolean().default(false),
}

/** Cross-field rules of the stand fields, called from the front matter's own superRefine. */
export function checkStandFrontMatter(
  fm: { standRuns: number; checklist?: ChecklistItem[]; requiresSignedRun: boolean },
  ctx: z.RefinementCtx,
): void {
  if (fm.checklist && fm.standRuns === 0) {
    ctx.addIssue({
      code: 'custom',
      path: ['checklist'],
      message: 'a checklist is walked through before stand runs: add "standRuns:" (how many runs a group may book)',
    })
  }
  if (fm.requiresSignedRun && fm.standRuns === 0) {
    ctx.addIssue({
      code: 'custom',
      path: ['requiresSignedRun'],
      message: 'a signed-off run needs stand runs: add "standRuns:" (how many runs a group may book)',
    })
  }
}
