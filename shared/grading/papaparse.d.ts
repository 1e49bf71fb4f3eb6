/**
 * The part of papaparse that shared code uses, declared here rather than taken from
 * @types/papaparse: those types start with `/// <reference types="node" />`, which would bring
 * Node's globals (Buffer, process, …) into every file of shared/ and defeat tsconfig.shared.json's
 * "no Node APIs" check. Importing the package's own build file by path (the same file a browser
 * build resolves `papaparse` to, through the package's "browser" field) keeps those types out.
 *
 * Only string input is used: https://www.papaparse.com/docs#strings
 */
declare module 'papaparse/papaparse.min.js' {
  export interface ParseConfig {
    /** Field separator; left out, papaparse guesses it. */
    delimiter?: string
    /** Separators papaparse may guess among when `delimiter` is left out. */
    delimitersToGuess?: string[]
    /** Read at most this many rows. */
    preview?: number
    newline?: '\r' | '\n' | '\r\n'
    quoteChar?: string
    header?: boolean
    dynamicTyping?: boolean
    skipEmptyLines?: boolean | 'greedy'
    transformHeader?: (header: string, index: number) => string
  }

  export interface ParseError {
    type: 'Quotes' | 'Delimiter' | 'FieldMismatch'
    code: 'MissingQuotes' | 'UndetectableDelimiter' | 'TooFewFields' | 'TooManyFields' | 'InvalidQuotes'
    message: string
    /** Index of the row (0-based among the parsed rows) where it happened, when known. */
    row?: number
  }

  export interface ParseMeta {
    delimiter: string
    linebreak: string
    aborted: boolean
    truncated: boolean
    cursor: number
    fields?: string[]
  }

  export interface ParseResult<T> {
    data: T[]
    errors: ParseError[]
    meta: ParseMeta
  }

  export function parse(input: string, config?: ParseConfig & { header?: false }): ParseResult<string[]>
  export function parse(
    input: string,
    config: ParseConfig & { header: true },
  ): ParseResult<Record<string, string | string[] | undefined>>

  const Papa: { parse: typeof parse }
  export default Papa
}
