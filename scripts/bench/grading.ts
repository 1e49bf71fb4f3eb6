/**
 * Grading benchmark: `npx tsx scripts/bench/grading.ts`.
 *
 * Prints, side by side in one run, for one 50 000-row, 4-column test-stand log (a demo blow-down
 * logged at 2.5 kHz, cut to 50 000 rows; demo data):
 * - papaparse alone on the text, with its default options (rows as arrays, separator guessed),
 *   which is the bare parse the goal is measured against;
 * - papaparse alone with header: true and skipEmptyLines: 'greedy' (rows as objects), for reference;
 * - the whole grading step: parseLog (parse, map, validate, convert to SI) + gradeSubmission with
 *   the demo cold-flow assignment (every expected value, review rule and data check) + chartSeries;
 * - its parts, so a regression can be placed;
 * and the ratio of the whole grading step to the bare parse (goal: at most 2).
 *
 * Each kernel is warmed up first (so V8 has optimised it), then the kernels run in alternating
 * rounds and the median round is reported, which damps drift from frequency scaling and other load.
 * Wall time and the process's CPU time are both reported; on a shared, busy machine the CPU time
 * is the steadier of the two.
 * A full garbage collection runs before each timed kernel, so the garbage one kernel leaves (the
 * parse alone leaves some 15 MB of row arrays and strings) is not collected on the next one's
 * time; each kernel pays for the collections its own allocations cause while it runs.
 * Every kernel's result feeds a sink printed at the end, so no work can be dropped as dead code.
 */
import { loadavg } from 'node:os'
import { setFlagsFromString } from 'node:v8'
import { runInNewContext } from 'node:vm'
import Papa from 'papaparse/papaparse.min.js'
import { coldFlowAssignment, demoLog } from '../demo/demo-runs'
import { parseLog, suggestMapping } from '../../shared/grading/csv'
import { chartSeries, gradeSubmission } from '../../shared/grading/grade'
import type { GradeResult } from '../../shared/grading/grade'
import { evaluateExpression } from '../../shared/modules/expressions'
import { valueToSI } from '../../shared/modules/quantities'
import { buildExpressionScope } from '../../shared/modules/scope'
import { reduceThrustRun } from '../../shared/physics'
import type { ExpressionValue, SubmissionData } from '../../shared/modules/scope'

const ROWS = 50_000
const WARM_UP = 3
const ROUNDS = 15

// https://nodejs.org/api/v8.html#v8setflagsfromstringflags: exposes gc() without a command-line flag,
// so `npx tsx scripts/bench/grading.ts` is enough.
setFlagsFromString('--expose-gc')
const collectGarbage = runInNewContext('gc') as () => void

const assignment = coldFlowAssignment()
const table = assignment.tables[0]
if (!table) throw new Error('the cold-flow assignment has no table')

const log = demoLog(2500)
const lines = log.csv.split('\n')
if (lines.length - 2 < ROWS) throw new Error(`the demo log has only ${lines.length - 2} rows`)
const text = `${lines.slice(0, ROWS + 1).join('\n')}\n`
const headers = (lines[0] ?? '').split(',')
const mapping = suggestMapping(headers, table)
const measurements = Object.fromEntries(
  assignment.measurements.map((m) => [m.key, valueToSI(log.measurements[m.key] as number, m.unit)]),
)

let sink = 0

function bareParse(): void {
  sink += Papa.parse(text).data.length
}

function headerParse(): void {
  sink += Papa.parse(text, { header: true, skipEmptyLines: 'greedy', dynamicTyping: false }).data.length
}

function parseOnly(): SubmissionData {
  const parsed = parseLog(text, table as NonNullable<typeof table>, mapping)
  if (!parsed.ok) throw new Error(`the benchmark log does not parse: ${JSON.stringify(parsed.errors)}`)
  sink += parsed.rowCount
  return {
    tables: { [(table as NonNullable<typeof table>).key]: parsed.columns },
    measurements,
    pressures: parsed.pressures,
  }
}

// Reported results for the benchmark: the expected values themselves (from one grading beforehand).
const reference: GradeResult = gradeSubmission({ assignment, data: parseOnly(), reported: {} })
const reported = Object.fromEntries(reference.checks.map((c) => [c.key, c.expected ?? 0]))
const preParsed = parseOnly()

// The expression engine reduces a thrust run once per column array (run-cache.ts), so grading the
// same arrays again would skip the reduction that every real hand-in pays for. Each call gets its
// own copy of the columns, made before the clock starts.
const copies: SubmissionData[] = []
function freshCopy(): SubmissionData {
  const tables = Object.fromEntries(
    Object.entries(preParsed.tables).map(([key, columns]) => [
      key,
      Object.fromEntries(Object.entries(columns).map(([c, xs]) => [c, xs.slice()])),
    ]),
  )
  return { ...preParsed, tables }
}
for (let i = 0; i < WARM_UP + ROUNDS; i++) copies.push(freshCopy())

function gradeOnly(): void {
  sink += gradeSubmission({ assignment, data: copies.pop() ?? freshCopy(), reported }).score
}

// The module's own expressions (expected values and review rules) over the prepared scope: the part
// of gradeSubmission that is mathjs evaluating the instructor's formulas.
const dataScope = buildExpressionScope(assignment, preParsed, { units: 'si' })
const ruleScope: Record<string, ExpressionValue> = { ...dataScope }
for (const r of assignment.results) ruleScope[r.key] = valueToSI(reported[r.key] as number, r.unit)

function expressionsOnly(): void {
  for (const r of assignment.results) {
    const v = evaluateExpression(r.expected, dataScope)
    sink += typeof v === 'number' ? v : 0
  }
  for (const rule of assignment.reviewRules) sink += evaluateExpression(rule.when, ruleScope) === true ? 1 : 0
}

// The formula library's reduction of the log's thrust run (the library itself keeps no cache).
const runColumns = preParsed.tables[(table as NonNullable<typeof table>).key] as Record<string, number[]>
function runOnly(): void {
  sink += reduceThrustRun(runColumns.t as number[], runColumns.thrust as number[]).totalImpulse
}

function chartOnly(): void {
  sink += chartSeries(assignment, preParsed).time.length
}

function wholeGrading(): void {
  const data = parseOnly()
  const result = gradeSubmission({ assignment, data, reported })
  const chart = chartSeries(assignment, data)
  sink += result.score + result.flags.length + chart.time.length
}

const kernels: [string, () => void][] = [
  ['papaparse alone, default options (arrays)', bareParse],
  ["papaparse alone, header: true, skipEmptyLines: 'greedy'", headerParse],
  ['  parseLog (parse, map, validate, SI)', () => void parseOnly()],
  [
    `  gradeSubmission (${assignment.results.length} results, ${assignment.reviewRules.length} rules, data checks)`,
    gradeOnly,
  ],
  ['    of which the thrust-run reduction (reduceThrustRun, once)', runOnly],
  [
    `    of which the module's ${assignment.results.length + assignment.reviewRules.length} expressions, the run already reduced (mathjs)`,
    expressionsOnly,
  ],
  ['  chartSeries (spans, ideal thrust, ≤ 2000 points)', chartOnly],
  ['whole grading step (parseLog + gradeSubmission + chartSeries)', wholeGrading],
]

for (let i = 0; i < WARM_UP; i++) for (const [, kernel] of kernels) kernel()
const times = new Map<string, number[]>(kernels.map(([name]) => [name, []]))
// CPU time of the process (all its threads, the garbage collector's included), which other work on
// a shared machine disturbs far less than the wall clock: a kernel preempted for 30 ms by another
// process loses wall time but no CPU time.
const cpuTimes = new Map<string, number[]>(kernels.map(([name]) => [name, []]))
for (let round = 0; round < ROUNDS; round++) {
  for (const [name, kernel] of kernels) {
    collectGarbage()
    const cpuStart = process.cpuUsage()
    const start = performance.now()
    kernel()
    times.get(name)?.push(performance.now() - start)
    const cpu = process.cpuUsage(cpuStart)
    cpuTimes.get(name)?.push((cpu.user + cpu.system) / 1000)
  }
}

const median = (xs: number[]) => {
  const s = [...xs].sort((a, b) => a - b)
  return s[s.length >> 1] as number
}
const medians = new Map([...times].map(([name, xs]) => [name, median(xs)]))
const cpuMedians = new Map([...cpuTimes].map(([name, xs]) => [name, median(xs)]))

console.log(
  `Grading benchmark: ${ROWS} rows × ${headers.length} columns (${(text.length / 1e6).toFixed(2)} MB), median of ${ROUNDS} rounds after ${WARM_UP} warm-up rounds, full GC before each`,
)
console.log(
  `Node ${process.version}; load average ${loadavg()
    .map((l) => l.toFixed(1))
    .join(' ')}; flags raised on this log: ${reference.flags.map((f) => f.code).join(', ') || 'none'}`,
)
console.log('')
console.log(`${''.padEnd(64)} ${'wall'.padStart(8)}    ${'CPU'.padStart(8)}`)
for (const [name] of kernels) {
  console.log(
    `${name.padEnd(64)} ${(medians.get(name) as number).toFixed(1).padStart(8)} ms ${(cpuMedians.get(name) as number).toFixed(1).padStart(8)} ms`,
  )
}
const bare = medians.get(kernels[0]![0]) as number
const header = medians.get(kernels[1]![0]) as number
const whole = medians.get(kernels[7]![0]) as number
console.log('')
console.log(
  `whole grading step / papaparse default parse: ${(whole / bare).toFixed(2)}×  (goal ≤ 2×: ${whole / bare <= 2 ? 'met' : 'not met'})`,
)
console.log(`whole grading step / papaparse header+greedy parse: ${(whole / header).toFixed(2)}×`)
const expressions = medians.get(kernels[5]![0]) as number
console.log(
  `whole grading step less the module's expressions / papaparse default parse: ${((whole - expressions) / bare).toFixed(2)}× (estimate: the engine's own share)`,
)
const cpuBare = cpuMedians.get(kernels[0]![0]) as number
const cpuWhole = cpuMedians.get(kernels[7]![0]) as number
console.log(
  `in CPU time: whole grading step / papaparse default parse: ${(cpuWhole / cpuBare).toFixed(2)}×  (goal ≤ 2×: ${cpuWhole / cpuBare <= 2 ? 'met' : 'not met'})`,
)
console.log(`(sink ${sink.toFixed(0)})`)
