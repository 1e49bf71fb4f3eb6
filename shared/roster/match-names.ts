/**
 * How a section or lab-group name in a roster file is matched to the course's own. Class lists
 * name groups the short way ("a1", "A1 ") where the course says "Group A1"; treating those as new
 * groups would move every student out of their group. So names compare by a key: case, surrounding
 * and repeated spaces, and a leading "Section" / "Group" / "Lab group" word do not count.
 *
 * A name whose key is close to an existing one but not equal (one or two edits) is most likely a
 * typing slip, and is refused with the existing name suggested, rather than becoming a new group.
 * Names that differ only in a number or in a short code word ("A1"/"A3", "Tue AM"/"Tue PM",
 * "A"/"B") are told apart on purpose and are not near-misses.
 */

export type NameKind = 'section' | 'group'

const LEADING_WORD: Record<NameKind, RegExp> = {
  section: /^(?:section|sect\.?|sec\.?)(?:\s+|[-:#]\s*)(?=\S)/,
  group: /^(?:lab\s+group|group|grp\.?)(?:\s+|[-:#]\s*)(?=\S)/,
}

const collapse = (name: string) => name.normalize('NFKC').trim().replace(/\s+/g, ' ').toLowerCase()

/** The key two names share when they name the same section or group. */
export function nameKey(kind: NameKind, name: string): string {
  const plain = collapse(name)
  return plain.replace(LEADING_WORD[kind], '')
}

let rows: [Int32Array, Int32Array] = [new Int32Array(64), new Int32Array(64)]

/** Levenshtein distance, stopping early once it is known to exceed `max`. */
export function editDistance(a: string, b: string, max = Infinity): number {
  if (Math.abs(a.length - b.length) > max) return max + 1
  // Two rows of the table, reused between calls (a file asks for thousands of distances).
  if (rows[0].length <= b.length) rows = [new Int32Array(b.length + 1), new Int32Array(b.length + 1)]
  let [prev, cur] = rows
  for (let j = 0; j <= b.length; j++) prev[j] = j
  for (let i = 1; i <= a.length; i++) {
    cur[0] = i
    let rowMin = i
    const ca = a.charCodeAt(i - 1)
    for (let j = 1; j <= b.length; j++) {
      const v = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + (ca === b.charCodeAt(j - 1) ? 0 : 1))
      cur[j] = v
      if (v < rowMin) rowMin = v
    }
    if (rowMin > max) return max + 1
    const done = prev
    prev = cur
    cur = done
  }
  return prev[b.length]!
}

/** Runs of letters, runs of digits, and single other characters. */
const tokens = (key: string) => key.match(/\p{L}+|\p{N}+|[^\p{L}\p{N}]/gu) ?? []

/** Same shape, and every differing part is a number or a word of at most two letters. */
function differsOnlyByCode(a: string, b: string): boolean {
  const ta = tokens(a)
  const tb = tokens(b)
  if (ta.length !== tb.length) return false
  for (let i = 0; i < ta.length; i++) {
    const x = ta[i]!
    const y = tb[i]!
    if (x === y) continue
    const bothNumbers = /^\p{N}+$/u.test(x) && /^\p{N}+$/u.test(y)
    const bothShortWords = /^\p{L}{1,2}$/u.test(x) && /^\p{L}{1,2}$/u.test(y)
    if (!bothNumbers && !bothShortWords) return false
  }
  return true
}

export interface NameMatch<T> {
  /** Existing entries with the same key (normally one; two when the course itself has e.g. "A1" and "Group A1"). */
  same: T[]
  /** When nothing has the same key: existing entries one or two edits away. */
  close: T[]
}

/**
 * A matcher over the course's entries, their keys worked out once: a file of 2,000 rows asks it
 * for every distinct name it holds.
 */
export function nameMatcher<T extends { name: string }>(kind: NameKind, existing: readonly T[]) {
  const entries = existing.map((e) => ({ e, key: nameKey(kind, e.name), plain: collapse(e.name) }))
  /** `among` narrows the entries compared, e.g. to other names of the same file. */
  return (name: string, among?: (e: T) => boolean): NameMatch<T> => {
    const key = nameKey(kind, name)
    const plain = collapse(name)
    const pool = among ? entries.filter((x) => among(x.e)) : entries
    const same = pool.filter((x) => x.key === key)
    if (same.length > 0) {
      // An exact spelling (ignoring case) wins when the course has two entries with one key.
      const exact = same.filter((x) => x.plain === plain)
      return { same: (exact.length > 0 ? exact : same).map((x) => x.e), close: [] }
    }
    const scored = pool.flatMap((x) => {
      const byKey = editDistance(key, x.key, 2)
      // Without a leading word the plain names are the keys: no second distance to work out.
      const d = plain === key && x.plain === x.key ? byKey : Math.min(byKey, editDistance(plain, x.plain, 2))
      return d >= 1 && d <= 2 && !differsOnlyByCode(key, x.key) ? [{ e: x.e, d }] : []
    })
    // Only the nearest are suggested: "A 1" is one edit from "A1" and two from "A2".
    const nearest = Math.min(...scored.map((x) => x.d))
    return { same: [], close: scored.filter((x) => x.d === nearest).map((x) => x.e) }
  }
}

/** Matches `name` against the course's existing entries. */
export function matchName<T extends { name: string }>(
  kind: NameKind,
  name: string,
  existing: readonly T[],
): NameMatch<T> {
  return nameMatcher(kind, existing)(name)
}
