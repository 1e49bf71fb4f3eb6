/**
 * The names an assignment gives things: keys (names in expressions, so they may not shadow a
 * function) and labels (what people read). Shared by the front-matter schema and its parts.
 */
import { z } from 'zod'
import { RESERVED_NAMES } from './expression-names'
import { singleLineName } from '../schemas/names'

export const KEY_PATTERN = /^[a-z][a-zA-Z0-9_]*$/

export const KeySchema = z
  .string()
  .max(40, 'a key has at most 40 characters')
  .regex(
    KEY_PATTERN,
    'a key starts with a lower-case letter and has only letters, digits and _ (for example chamber_pressure)',
  )
  .refine((k) => !RESERVED_NAMES.has(k), {
    message:
      'this key is the name of a function, constant or keyword of the expressions; choose another (for example add a suffix)',
  })

export const TableKeySchema = z
  .string()
  .max(40, 'a key has at most 40 characters')
  .regex(KEY_PATTERN, 'a key starts with a lower-case letter and has only letters, digits and _ (for example run_log)')

// Labels are names too: they head form fields, CSV columns and the feedback report.
export const LabelSchema = singleLineName({
  field: 'label',
  max: 200,
  messages: { tooShort: 'the label must not be empty', tooLong: 'a label has at most 200 characters' },
})
