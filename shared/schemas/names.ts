import { z } from 'zod'

/**
 * Names and titles are one line of ordinary text: they end up in e-mail subjects and headers, CSV
 * cells, PDF headings, page titles and log lines, where a line break or an escape code either
 * breaks the layout or says something the person did not write. Any letter, digit, punctuation
 * mark, symbol or emoji of any script is fine; what is refused:
 * - C0 and C1 control characters (U+0000–U+001F, U+007F–U+009F): line feed, carriage return, tab,
 *   escape, NUL, bell, …;
 * - the Unicode line and paragraph separators (U+2028, U+2029);
 * - the invisible bidirectional embedding, override and isolate controls (U+202A–U+202E,
 *   U+2066–U+2069), which can make a name display as something other than what it is.
 * Joiners (U+200C, U+200D) stay allowed: several scripts and emoji need them.
 */
// eslint-disable-next-line no-control-regex -- control characters are exactly what this refuses
const NOT_IN_A_NAME = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u202a-\u202e\u2066-\u2069]/

const CALLED: Readonly<Record<string, string>> = {
  '\n': 'a line break',
  '\r': 'a line break (carriage return)',
  '\t': 'a tab',
  '\u2028': 'a line separator',
  '\u2029': 'a paragraph separator',
}

/** The first character a one-line name may not hold, described in words; null when there is none. */
export function singleLineProblem(text: string): string | null {
  const m = NOT_IN_A_NAME.exec(text)
  if (!m) return null
  const ch = m[0]
  const code = `U+${ch.charCodeAt(0).toString(16).toUpperCase().padStart(4, '0')}`
  const what =
    CALLED[ch] ?? (ch >= '\u202a' ? `an invisible text-direction control (${code})` : `the control character ${code}`)
  return `${what} at character ${m.index + 1}`
}

export interface SingleLineNameOptions {
  /** The field in plain words, as the person knows it ("title", "section name"); named in every message. */
  field: string
  /** Fewest characters after trimming (default 1). */
  min?: number
  max: number
  /** Messages in the wording of the form that uses the field; the defaults name `field`. */
  messages?: { missing?: string; tooShort?: string; tooLong?: string }
}

/**
 * A single-line name or title: text, trimmed, `min`–`max` characters, and no character from
 * {@link singleLineProblem}'s list. Every title and name field of the shared schemas uses it.
 *
 * @example singleLineName({ field: 'title', min: 3, max: 200 }).parse('Nozzle\nflow')
 * // throws: "The title must be one line of plain text, but it contains a line break at character 7."
 */
export function singleLineName(opts: SingleLineNameOptions) {
  const min = opts.min ?? 1
  const m = opts.messages ?? {}
  return (
    z
      // Without a message of its own, a missing or non-text value keeps zod's (or the caller's
      // error map's) wording, e.g. the module editor's "should be text, not the number 5".
      .string(m.missing === undefined ? undefined : { error: m.missing })
      .trim()
      .min(
        min,
        m.tooShort ??
          (min === 1 ? `The ${opts.field} must not be empty.` : `The ${opts.field} needs at least ${min} characters.`),
      )
      .max(opts.max, m.tooLong ?? `The ${opts.field} has at most ${opts.max} characters.`)
      .superRefine((text, ctx) => {
        const problem = singleLineProblem(text)
        if (problem)
          ctx.addIssue({
            code: 'custom',
            message: `The ${opts.field} must be one line of plain text, but it contains ${problem}.`,
          })
      })
  )
}
