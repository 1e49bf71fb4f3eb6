/**
 * Median by selection (Hoare's quickselect, expected O(n)) in place: the time-gap check and the
 * run reduction take medians of up to 200 000 samples, where a full sort would cost several times more.
 * The array is reordered. An even count gives the mean of the middle two.
 */
export function medianInPlace(a: Float64Array): number {
  const n = a.length
  const mid = n >> 1
  let lo = 0
  let hi = n - 1
  while (lo < hi) {
    const pivot = a[(lo + hi) >> 1] as number
    let i = lo
    let j = hi
    while (i <= j) {
      while ((a[i] as number) < pivot) i++
      while ((a[j] as number) > pivot) j--
      if (i <= j) {
        const t = a[i] as number
        a[i] = a[j] as number
        a[j] = t
        i++
        j--
      }
    }
    if (mid <= j) hi = j
    else if (mid >= i) lo = i
    else break
  }
  const upper = a[mid] as number
  if (n % 2 === 1) return upper
  // Everything left of mid is ≤ a[mid]; the other middle value is the largest of them.
  let lower = -Infinity
  for (let k = 0; k < mid; k++) if ((a[k] as number) > lower) lower = a[k] as number
  return (lower + upper) / 2
}
