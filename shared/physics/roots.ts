/**
 * Bracketed root finding used inside the formula library where no closed form exists.
 */

/**
 * Finds x in [a, b] with f(x) = 0 by Brent's method (inverse quadratic interpolation and secant
 * steps, falling back to bisection, so it never leaves the bracket and always converges).
 *
 * Source: R. P. Brent, "Algorithms for Minimization without Derivatives" (1973), ch. 4, procedure
 * `zero` (written from memory of that algorithm).
 *
 * @param f - continuous function whose values at `a` and `b` differ in sign (or one is zero)
 * @param a - one end of the bracket
 * @param b - the other end of the bracket
 * @returns a root, to within a few units in the last place of x
 * @example
 * findRoot((x) => x * x - 2, 0, 2) // ≈ 1.4142135623730951
 */
export function findRoot(f: (x: number) => number, a: number, b: number): number {
  let fa = f(a)
  let fb = f(b)
  if (fa === 0) return a
  if (fb === 0) return b
  if (!(fa * fb < 0)) {
    // A programming error inside the library, not a bad argument from a caller.
    throw new Error(`findRoot: root not bracketed by [${a}, ${b}] (f = ${fa}, ${fb})`)
  }
  let c = a
  let fc = fa
  let d = b - a
  let e = d
  for (let iteration = 0; iteration < 300; iteration++) {
    if ((fb > 0 && fc > 0) || (fb < 0 && fc < 0)) {
      c = a
      fc = fa
      d = b - a
      e = d
    }
    if (Math.abs(fc) < Math.abs(fb)) {
      a = b
      b = c
      c = a
      fa = fb
      fb = fc
      fc = fa
    }
    const tolerance = 2 * Number.EPSILON * Math.abs(b) + Number.MIN_VALUE
    const half = 0.5 * (c - b)
    if (Math.abs(half) <= tolerance || fb === 0) return b
    if (Math.abs(e) >= tolerance && Math.abs(fa) > Math.abs(fb)) {
      const s = fb / fa
      let p: number
      let q: number
      if (a === c) {
        p = 2 * half * s
        q = 1 - s
      } else {
        const qa = fa / fc
        const r = fb / fc
        p = s * (2 * half * qa * (qa - r) - (b - a) * (r - 1))
        q = (qa - 1) * (r - 1) * (s - 1)
      }
      if (p > 0) q = -q
      else p = -p
      if (2 * p < Math.min(3 * half * q - Math.abs(tolerance * q), Math.abs(e * q))) {
        e = d
        d = p / q
      } else {
        d = half
        e = d
      }
    } else {
      d = half
      e = d
    }
    a = b
    fa = fb
    b += Math.abs(d) > tolerance ? d : half > 0 ? tolerance : -tolerance
    fb = f(b)
  }
  return b
}
