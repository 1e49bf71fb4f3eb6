/**
 * Formula-library benchmark: `npm run bench` (tsx scripts/bench/physics.ts).
 *
 * Measures, in one run and side by side:
 * - the cost of machFromAreaRatio relative to one forward isentropic() evaluation (goal ≤ 8×),
 * - solves per second for 10⁶ random area ratios on each branch,
 * - nozzleFlow evaluations per second over random nozzles and back pressures.
 *
 * Inputs come from a seeded generator so runs are comparable. Every kernel feeds its results into a
 * sink that is printed at the end, so V8 cannot drop the work as dead code. Each kernel is warmed up
 * (so it is optimised before timing), then the kernels are timed in alternating rounds and the
 * median round is reported, which damps drift from frequency scaling and other load.
 */
import { isentropic, machFromAreaRatio, nozzleFlow } from '../../shared/physics/index'
import type { NozzleInput } from '../../shared/physics/index'
import { solveMachFromAreaRatio } from '../../shared/physics/isentropic'

const COUNT = 1_000_000
const NOZZLE_COUNT = 200_000
const ROUNDS = 7
const GAMMA = 1.4

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

const random = seeded(20240601)
// Area ratios log-uniform in [1, 1e4]; Mach numbers log-uniform over the same span of flows
// (A/A* = 1e4 is M ≈ 5.8e-5 subsonic and M ≈ 23 supersonic for γ = 1.4; 0.01 to 25 covers it).
const areaRatios = Float64Array.from({ length: COUNT }, () => 10 ** (4 * random()))
const machs = Float64Array.from({ length: COUNT }, () => 0.01 * 2500 ** random())
const nozzles: NozzleInput[] = Array.from({ length: NOZZLE_COUNT }, () => {
  const chamberPressure = 2e5 + 2e6 * random()
  return {
    chamberPressure,
    chamberTemperature: 250 + 300 * random(),
    ambientPressure: chamberPressure * 0.999 * random(),
    throatArea: 1e-5 * (1 + random()),
    exitArea: 0, // set below from a random area ratio
    gamma: GAMMA,
    gasConstant: 287.05,
  }
})
for (const nozzle of nozzles) nozzle.exitArea = nozzle.throatArea * (1 + 19 * random())

let sink = 0

function forward(): void {
  let s = 0
  for (let i = 0; i < COUNT; i++) s += isentropic(machs[i]!, GAMMA).areaRatio
  sink += s
}
function solveSubsonic(): void {
  let s = 0
  for (let i = 0; i < COUNT; i++) s += machFromAreaRatio(areaRatios[i]!, GAMMA, 'subsonic')
  sink += s
}
function solveSupersonic(): void {
  let s = 0
  for (let i = 0; i < COUNT; i++) s += machFromAreaRatio(areaRatios[i]!, GAMMA, 'supersonic')
  sink += s
}
function nozzles_(): void {
  let s = 0
  for (let i = 0; i < NOZZLE_COUNT; i++) s += nozzleFlow(nozzles[i]!).thrust
  sink += s
}

const kernels = { forward, solveSubsonic, solveSupersonic, nozzles: nozzles_ } as const
type Kernel = keyof typeof kernels
const calls: Record<Kernel, number> = {
  forward: COUNT,
  solveSubsonic: COUNT,
  solveSupersonic: COUNT,
  nozzles: NOZZLE_COUNT,
}

// Warm-up: two full passes of each kernel so every one is optimised before it is timed.
for (let pass = 0; pass < 2; pass++) for (const run of Object.values(kernels)) run()

const samples: Record<Kernel, number[]> = { forward: [], solveSubsonic: [], solveSupersonic: [], nozzles: [] }
for (let round = 0; round < ROUNDS; round++) {
  for (const name of Object.keys(kernels) as Kernel[]) {
    const start = performance.now()
    kernels[name]()
    samples[name].push(((performance.now() - start) * 1e6) / calls[name]) // ns per call
  }
}
const median = (values: number[]): number => {
  const sorted = [...values].sort((a, b) => a - b)
  return sorted[Math.floor(sorted.length / 2)]!
}
const ns = {
  forward: median(samples.forward),
  solveSubsonic: median(samples.solveSubsonic),
  solveSupersonic: median(samples.solveSupersonic),
  nozzles: median(samples.nozzles),
}
const bothBranches = 0.5 * (ns.solveSubsonic + ns.solveSupersonic)

let iterationsSub = 0
let iterationsSup = 0
for (let i = 0; i < COUNT; i++) {
  iterationsSub += solveMachFromAreaRatio(areaRatios[i]!, GAMMA, false).iterations
  iterationsSup += solveMachFromAreaRatio(areaRatios[i]!, GAMMA, true).iterations
}

const perSecond = (nsPerCall: number): string => `${(1e3 / nsPerCall).toFixed(2)} M/s`
const row = (label: string, nsPerCall: number, extra = ''): string =>
  `  ${label.padEnd(58)}${nsPerCall.toFixed(1).padStart(8)} ns/call  ${perSecond(nsPerCall).padStart(10)}${extra}`

const ratio = bothBranches / ns.forward
console.log(
  `Formula library benchmark — Node ${process.version}, ${process.arch}; γ = ${GAMMA}; median of ${ROUNDS} alternating rounds after warm-up`,
)
console.log(row(`isentropic(M, γ), ${COUNT.toLocaleString('en')} Mach numbers`, ns.forward))
console.log(
  row(
    `machFromAreaRatio, subsonic, ${COUNT.toLocaleString('en')} A/A* in [1, 1e4]`,
    ns.solveSubsonic,
    `  ${(ns.solveSubsonic / ns.forward).toFixed(2)}× forward`,
  ),
)
console.log(
  row(
    `machFromAreaRatio, supersonic, same A/A*`,
    ns.solveSupersonic,
    `  ${(ns.solveSupersonic / ns.forward).toFixed(2)}× forward`,
  ),
)
console.log(
  row(
    'machFromAreaRatio, both branches (mean)',
    bothBranches,
    `  ${ratio.toFixed(2)}× forward (goal ≤ 8×: ${ratio <= 8 ? 'met' : 'NOT met'})`,
  ),
)
console.log(row(`nozzleFlow, ${NOZZLE_COUNT.toLocaleString('en')} random nozzles/back pressures`, ns.nozzles))
console.log(
  `  mean Halley steps per solve: subsonic ${(iterationsSub / COUNT).toFixed(2)}, supersonic ${(iterationsSup / COUNT).toFixed(2)}`,
)
console.log(`  (sink ${sink.toExponential(6)})`)
