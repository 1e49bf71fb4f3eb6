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

/** Levenshtein distance, stopping early once it is known to exceed `max`. */
export function editDistance(a: string, b: string, max = Infinity): number {
  if (Math.abs(a.length - b.length) > max) return max + 1
  let prev = Array.from({ length: b.length + 1 }, (_, j) => j)
  for (let i = 1; i <= a.length; i++) {
    const cur = [i]
    let rowMin = i
    for (let j = 1; j <= b.length; j++) {
      const v = Math.min(prev[j]! + 1, cur[j - 1]! + 1, prev[j - 1]! + (a[i - 1] === b[j - 1] ? 0 : 1))
      cur.push(v)
      if (v < rowMin) rowMin = v
    }
    if (rowMin > max) return max + 1
    prev = cur
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

/** Matches `name` against the course's existing entries. */
export function matchName<T extends { name: string }>(
  kind: NameKind,
  name: string,
  existing: readonly T[],
): NameMatch<T> {
  const key = nameKey(kind, name)
  const plain = collapse(name)
  const same = existing.filter((e) => nameKey(kind, e.name) === key)
  if (same.length > 0) {
    // An exact spelling (ignoring case) wins when the course has two entries with one key.
    const exact = same.filter((e) => collapse(e.name) === plain)
    return { same: exact.length > 0 ? exact : same, close: [] }
  }
  const scored = existing.flatMap((e) => {
    const k = nameKey(kind, e.name)
    if (differsOnlyByCode(key, k)) return []
    const d = Math.min(editDistance(key, k, 2), editDistance(plain, collapse(e.name), 2))
    return d >= 1 && d <= 2 ? [{ e, d }] : []
  })
  // Only the nearest are suggested: "A 1" is one edit from "A1" and two from "A2".
  const nearest = Math.min(...scored.map((x) => x.d))
  const close = scored.filter((x) => x.d === nearest).map((x) => x.e)
  return { same, close }
}
