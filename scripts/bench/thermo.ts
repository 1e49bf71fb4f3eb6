/**
 * Thermochemistry benchmark: `npm run bench` (tsx scripts/bench/thermo.ts).
 *
 * Prints the mean time of one `combustion()` call
 * - uncached: 2 000 different inputs (fuel, φ 0.4–2.5, pressure 0.1–100 bar log-uniform, reactant
 *   temperature 250–600 K) from a seeded generator, the cache emptied before every round, so every
 *   call solves the equilibrium (goal: under 2 ms);
 * - cached: 64 inputs asked for over and over, all held in the cache.
 * Warmed up first, then the two run in alternating rounds and the median round is reported. Results
 * feed a sink printed at the end so no work is dropped as dead code.
 */
import { clearCombustionCache, combustion, FUELS } from '../../shared/thermo/index'
import type { CombustionInput } from '../../shared/thermo/index'

const UNCACHED = 2_000
const CACHED_CALLS = 200_000
const CACHED_DISTINCT = 64
const ROUNDS = 7

/** mulberry32: a small seeded PRNG, uniform in [0, 1). */
function seeded(seed: number): () => number {
  let a = seed >>> 0
  return () => {
    a = (a + 0x6d2b79f5) >>> 0
    let t = a
    t = Math.imul(t ^ (t >>> 15), t | 1)
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61)
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296
  }
}

const random = seeded(20261202)
const inputs: CombustionInput[] = Array.from({ length: UNCACHED }, () => ({
  fuel: FUELS[Math.floor(random() * FUELS.length)]!,
  equivalenceRatio: 0.4 + 2.1 * random(),
  pressure: 1e4 * 1000 ** random(),
  reactantTemperature: 250 + 350 * random(),
}))

let sink = 0
function uncached(): void {
  clearCombustionCache()
  let s = 0
  for (let i = 0; i < UNCACHED; i++) s += combustion(inputs[i]!).temperature
  sink += s
}
function cached(): void {
  let s = 0
  for (let i = 0; i < CACHED_CALLS; i++) s += combustion(inputs[i % CACHED_DISTINCT]!).characteristicVelocity
  sink += s
}

for (let pass = 0; pass < 2; pass++) {
  uncached()
  cached()
}
const samples = { uncached: [] as number[], cached: [] as number[] }
for (let round = 0; round < ROUNDS; round++) {
  let start = performance.now()
  uncached()
  samples.uncached.push(((performance.now() - start) * 1e3) / UNCACHED) // µs per call
  start = performance.now()
  cached()
  samples.cached.push(((performance.now() - start) * 1e3) / CACHED_CALLS)
}
const median = (values: number[]): number => [...values].sort((a, b) => a - b)[Math.floor(values.length / 2)]!

const uncachedUs = median(samples.uncached)
const cachedUs = median(samples.cached)
console.log(
  `Thermochemistry benchmark — Node ${process.version}, ${process.arch}; median of ${ROUNDS} alternating rounds after warm-up`,
)
console.log(
  `  combustion(), uncached, ${UNCACHED.toLocaleString('en')} varied inputs`.padEnd(62) +
    `${uncachedUs.toFixed(1).padStart(8)} µs/call  (goal < 2000 µs: ${uncachedUs < 2000 ? 'met' : 'NOT met'})`,
)
console.log(
  `  combustion(), cached, ${CACHED_DISTINCT} inputs repeated`.padEnd(62) +
    `${cachedUs.toFixed(2).padStart(8)} µs/call`,
)
console.log(`  (sink ${sink.toExponential(6)})`)
