/**
 * Chemical equilibrium of an ideal-gas mixture by minimising the Gibbs energy with element
 * potentials (Lagrange multipliers) and Newton iteration.
 *
 * Source: S. Gordon & B. J. McBride, "Computer Program for Calculation of Complex Chemical
 * Equilibrium Compositions and Applications, I. Analysis", NASA RP-1311 (1994):
 * - the reduced Newton equations in the element potentials πᵢ, Δln n and Δln T, ch. 2,
 *   eq. 2.24 (elements), 2.26 (total moles) and 2.27 (enthalpy, for the assigned-enthalpy
 *   problem); the species corrections from eq. 2.18 (with the Δln T term of §2.4);
 * - the control factor λ and the trace-species limit, §3.3 (eq. 3.1–3.2): in one step a species may
 *   grow by at most a factor e² and T and n by e^0.4, and a species below mole fraction 1e-8 may rise
 *   to at most 1e-4;
 * - the initial estimates, §3.4 (0.1 mol/g spread evenly over the species).
 * Only gaseous species; amounts are per gram of mixture (mol/g), so Σ nⱼ·Mⱼ = 1 g.
 *
 * The convergence test is tighter than the program's (§3.5 uses 0.5e-5): the solver iterates until
 * every relative correction is below 1e-12 so that the elements balance to about 1e-13.
 */
import type { Element, SpeciesData } from './species-data'
import { REFERENCE_PRESSURE, cpOverRUnchecked, enthalpyOverRTUnchecked, entropyOverRUnchecked } from './properties'

/** ln(1e-8): below this mole fraction a species counts as a trace species (RP-1311 §3.3, "SIZE"). */
const TRACE_LOG_FRACTION = -18.420681
/** ln(1e-4): the most a trace species may rise to in one step (RP-1311 eq. 3.2). */
const TRACE_STEP_LIMIT = -9.2103404
/** Relative size of the corrections at which the iteration has converged. */
const TOLERANCE = 1e-12
const MAX_ITERATIONS = 200
/** The temperature is kept inside these bounds (K) while iterating; the polynomials extrapolate beyond. */
const MIN_TEMPERATURE = 150
const MAX_TEMPERATURE = 6000

/** A set of species and elements with its composition matrix, fixed for many solves. */
export interface EquilibriumSystem {
  readonly species: readonly SpeciesData[]
  readonly elements: readonly Element[]
  /** aⱼᵢ: atoms of element i in species j, row-major (species × elements). */
  readonly atoms: Float64Array
}

/**
 * Builds the system for the given species and elements. Species containing an element not in
 * `elements` are dropped (they cannot form).
 */
export function equilibriumSystem(species: readonly SpeciesData[], elements: readonly Element[]): EquilibriumSystem {
  const kept = species.filter((s) =>
    Object.entries(s.elements).every(([e, count]) => !count || elements.includes(e as Element)),
  )
  const atoms = new Float64Array(kept.length * elements.length)
  kept.forEach((s, j) => elements.forEach((e, i) => (atoms[j * elements.length + i] = s.elements[e] ?? 0)))
  return { species: kept, elements, atoms }
}

/** What is held fixed besides pressure and element amounts. */
export type EquilibriumCondition = { temperature: number } | { enthalpyOverR: number; temperatureGuess?: number }

/** The equilibrium state found. */
export interface EquilibriumState {
  /** K. */
  temperature: number
  /** mol per gram of mixture, one per species of the system. */
  moles: Float64Array
  /** Σ nⱼ, mol/g. */
  totalMoles: number
  /** Newton iterations used. */
  iterations: number
}

/**
 * Solves for the equilibrium composition at pressure `pressure` (Pa) of a mixture holding
 * `elementAmounts[i]` mol of element i per gram, at fixed temperature or fixed enthalpy
 * (`enthalpyOverR` = h/R in K·mol/g, i.e. the mixture's enthalpy per gram divided by R̄).
 * Throws an Error if the iteration does not converge (a fault of the library, not of the input).
 */
export function solveEquilibrium(
  system: EquilibriumSystem,
  elementAmounts: Float64Array,
  pressure: number,
  condition: EquilibriumCondition,
): EquilibriumState {
  const { species, atoms } = system
  const ns = species.length
  const nl = system.elements.length
  const fixedTemperature = 'temperature' in condition
  const size = nl + (fixedTemperature ? 1 : 2)
  const width = size + 1
  const lnP = Math.log(pressure / REFERENCE_PRESSURE)

  const lnN = new Float64Array(ns)
  const n = new Float64Array(ns)
  const h = new Float64Array(ns)
  const cp = new Float64Array(ns)
  const mu = new Float64Array(ns)
  const step = new Float64Array(ns)
  const matrix = new Float64Array(size * width)
  const solution = new Float64Array(size)

  // RP-1311 §3.4: n = 0.1 and nⱼ = 0.1/ns; the temperature starts at a typical flame value.
  let lnTotal = Math.log(0.1)
  lnN.fill(Math.log(0.1 / ns))
  let lnT = Math.log(fixedTemperature ? condition.temperature : (condition.temperatureGuess ?? 2200))
  const enthalpyOverR = fixedTemperature ? 0 : condition.enthalpyOverR
  let maxElement = 0
  for (let i = 0; i < nl; i++) maxElement = Math.max(maxElement, elementAmounts[i]!)

  for (let iteration = 1; iteration <= MAX_ITERATIONS; iteration++) {
    const t = Math.exp(lnT)
    const total = Math.exp(lnTotal)
    let sumN = 0
    for (let j = 0; j < ns; j++) {
      const s = species[j]!
      const hj = enthalpyOverRTUnchecked(s, t)
      h[j] = hj
      cp[j] = cpOverRUnchecked(s, t)
      const nj = Math.exp(lnN[j]!)
      n[j] = nj
      sumN += nj
      // μⱼ/RT = g°ⱼ/RT + ln(nⱼ/n) + ln(p/p°)  (RP-1311 eq. 2.11, ideal gas)
      mu[j] = hj - entropyOverRUnchecked(s, t) + lnN[j]! - lnTotal + lnP
    }

    // Reduced Newton equations, RP-1311 eq. 2.24, 2.26, 2.27.
    matrix.fill(0)
    const rowN = nl
    const rowH = nl + 1
    let sumNH = 0
    let sumNMu = 0
    let sumNHMu = 0
    let sumNCp = 0
    let sumNH2 = 0
    for (let j = 0; j < ns; j++) {
      const nj = n[j]!
      const hj = h[j]!
      const mj = mu[j]!
      sumNH += nj * hj
      sumNMu += nj * mj
      sumNHMu += nj * hj * mj
      sumNCp += nj * cp[j]!
      sumNH2 += nj * hj * hj
      for (let i = 0; i < nl; i++) {
        const aji = atoms[j * nl + i]!
        if (aji === 0) continue
        const w = aji * nj
        for (let k = 0; k < nl; k++) matrix[i * width + k]! += w * atoms[j * nl + k]!
        matrix[i * width + rowN]! += w // bᵢ
        matrix[i * width + size]! += w * mj
        if (!fixedTemperature) {
          matrix[i * width + rowH]! += w * hj
          matrix[rowH * width + i]! += w * hj
        }
      }
    }
    for (let i = 0; i < nl; i++) {
      const bi = matrix[i * width + rowN]!
      matrix[i * width + size]! += elementAmounts[i]! - bi
      matrix[rowN * width + i] = bi
    }
    matrix[rowN * width + rowN] = sumN - total
    matrix[rowN * width + size] = total - sumN + sumNMu
    if (!fixedTemperature) {
      matrix[rowN * width + rowH] = sumNH
      matrix[rowH * width + rowN] = sumNH
      matrix[rowH * width + rowH] = sumNCp + sumNH2
      matrix[rowH * width + size] = enthalpyOverR / t - sumNH + sumNHMu
    }
    if (!solveLinear(matrix, size, solution)) throw new Error('equilibrium: singular Newton matrix')

    const dlnTotal = solution[rowN]!
    const dlnT = fixedTemperature ? 0 : solution[rowH]!
    // Species corrections, RP-1311 eq. 2.18 with the temperature term.
    let largest = Math.max(5 * Math.abs(dlnT), 5 * Math.abs(dlnTotal))
    let traceLimit = Infinity
    let converged = Math.abs(dlnT) <= TOLERANCE && (total * Math.abs(dlnTotal)) / sumN <= TOLERANCE
    for (let j = 0; j < ns; j++) {
      let d = -mu[j]! + dlnTotal + h[j]! * dlnT
      for (let i = 0; i < nl; i++) d += atoms[j * nl + i]! * solution[i]!
      step[j] = d
      if ((n[j]! * Math.abs(d)) / sumN > TOLERANCE) converged = false
      const lnFraction = lnN[j]! - lnTotal
      if (lnFraction > TRACE_LOG_FRACTION) {
        if (d > 0) largest = Math.max(largest, d)
      } else if (d >= 0 && d - dlnTotal !== 0) {
        traceLimit = Math.min(traceLimit, Math.abs((-lnFraction + TRACE_STEP_LIMIT) / (d - dlnTotal)))
      }
    }
    // Control factor λ, RP-1311 eq. 3.1–3.3.
    const lambda = Math.min(1, largest > 2 ? 2 / largest : 1, traceLimit)
    for (let j = 0; j < ns; j++) lnN[j]! += lambda * step[j]!
    lnTotal += lambda * dlnTotal
    lnT = Math.min(Math.log(MAX_TEMPERATURE), Math.max(Math.log(MIN_TEMPERATURE), lnT + lambda * dlnT))

    if (converged && elementsBalance(system, elementAmounts, lnN, maxElement)) {
      const moles = new Float64Array(ns)
      let totalMoles = 0
      for (let j = 0; j < ns; j++) {
        moles[j] = Math.exp(lnN[j]!)
        totalMoles += moles[j]!
      }
      return { temperature: Math.exp(lnT), moles, totalMoles, iterations: iteration }
    }
  }
  throw new Error('equilibrium: the Newton iteration did not converge')
}

function elementsBalance(system: EquilibriumSystem, b0: Float64Array, lnN: Float64Array, maxElement: number): boolean {
  const nl = system.elements.length
  for (let i = 0; i < nl; i++) {
    let b = 0
    for (let j = 0; j < system.species.length; j++) b += system.atoms[j * nl + i]! * Math.exp(lnN[j]!)
    if (Math.abs(b - b0[i]!) > 1e-13 * maxElement) return false
  }
  return true
}

/**
 * Gaussian elimination with partial pivoting on an augmented size × (size + 1) matrix (row-major),
 * writing the solution to `x`. Returns false for a singular matrix.
 */
function solveLinear(m: Float64Array, size: number, x: Float64Array): boolean {
  const width = size + 1
  for (let col = 0; col < size; col++) {
    let pivot = col
    let best = Math.abs(m[col * width + col]!)
    for (let r = col + 1; r < size; r++) {
      const v = Math.abs(m[r * width + col]!)
      if (v > best) {
        best = v
        pivot = r
      }
    }
    if (best === 0 || !Number.isFinite(best)) return false
    if (pivot !== col) {
      for (let c = col; c < width; c++) {
        const tmp = m[col * width + c]!
        m[col * width + c] = m[pivot * width + c]!
        m[pivot * width + c] = tmp
      }
    }
    const diagonal = m[col * width + col]!
    for (let r = col + 1; r < size; r++) {
      const factor = m[r * width + col]! / diagonal
      if (factor === 0) continue
      for (let c = col; c < width; c++) m[r * width + c]! -= factor * m[col * width + c]!
    }
  }
  for (let r = size - 1; r >= 0; r--) {
    let sum = m[r * width + size]!
    for (let c = r + 1; c < size; c++) sum -= m[r * width + c]! * x[c]!
    x[r] = sum / m[r * width + r]!
  }
  return true
}
