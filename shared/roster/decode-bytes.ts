/**
 * Turning an uploaded roster file's bytes into text. Spreadsheets save CSV as UTF-8 (often with a
 * byte-order mark), as UTF-16 with a mark ("Unicode text"), or in the Windows code page of the
 * machine that saved it, which for Western European names is Windows-1252. The bytes themselves
 * tell these apart well enough: a mark names its encoding, and text that is not valid UTF-8 is
 * read as Windows-1252 (every byte is a character there, so it never fails).
 *
 * Pure: TextDecoder exists in browsers and in Node, so the browser's quick check and the server
 * decode the same bytes the same way.
 */
import type { RosterEncoding } from '../schemas/roster-import'

// shared/ compiles without DOM or Node types; this is the part of the WHATWG TextDecoder used here.
// https://encoding.spec.whatwg.org/#interface-textdecoder
declare const TextDecoder: new (
  label: string,
  options?: { fatal?: boolean; ignoreBOM?: boolean },
) => { decode(input: Uint8Array): string }

export interface DecodedRoster {
  text: string
  encoding: RosterEncoding
}

const startsWith = (b: Uint8Array, ...prefix: number[]) => prefix.every((x, i) => b[i] === x)

/** Decodes a roster file; the byte-order mark, if any, is not part of the returned text. */
export function decodeRosterBytes(bytes: Uint8Array): DecodedRoster {
  if (startsWith(bytes, 0xef, 0xbb, 0xbf)) {
    // A file that says UTF-8 but is not: invalid sequences become U+FFFD rather than failing,
    // and the reader shows them in the cells, where the person can see what went wrong.
    return { text: new TextDecoder('utf-8').decode(bytes.subarray(3)), encoding: 'utf-8-bom' }
  }
  if (startsWith(bytes, 0xff, 0xfe))
    return { text: new TextDecoder('utf-16le').decode(bytes.subarray(2)), encoding: 'utf-16' }
  if (startsWith(bytes, 0xfe, 0xff))
    return { text: new TextDecoder('utf-16be').decode(bytes.subarray(2)), encoding: 'utf-16' }
  try {
    return { text: new TextDecoder('utf-8', { fatal: true }).decode(bytes), encoding: 'utf-8' }
  } catch {
    return { text: new TextDecoder('windows-1252').decode(bytes), encoding: 'windows-1252' }
  }
}

/** Words for the preview: how the file's bytes were read. */
export const ENCODING_WORDS: Readonly<Record<RosterEncoding, string>> = {
  'utf-8': 'UTF-8',
  'utf-8-bom': 'UTF-8 with a byte-order mark',
  'utf-16': 'UTF-16 (Unicode text)',
  'windows-1252': 'Windows-1252 (Western European; the file is not UTF-8)',
  text: 'text typed or pasted here',
}
