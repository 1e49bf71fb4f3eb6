/**
 * Feedback-report benchmark: `npx tsx scripts/bench/report.ts`.
 *
 * Renders one feedback report PDF of the size a cold-flow hand-in gives (7 checked results, one
 * flag, two staff comments, a chart of CHART_MAX_POINTS samples in four series; synthetic numbers,
 * not a measurement) several times and prints the median time and the file size. The per-module
 * archive renders one of these per lab group, so its time is about this times the number of groups.
 */
import { performance } from 'node:perf_hooks'
import { CHART_MAX_POINTS } from '../../shared/grading/grade'
import { feedbackPdfBuffer } from '../../server/reports/feedback-pdf'
import type { FeedbackReportData } from '../../server/reports/feedback-pdf'

const WARM_UP = 2
const ROUNDS = 10

const n = CHART_MAX_POINTS
const time = Array.from({ length: n }, (_, i) => (i * 22) / n)
const decay = (t: number) => (t < 2 ? 0 : Math.exp(-(t - 2) / 4))
const data: FeedbackReportData = {
  course: {
    code: 'PRL 341',
    title: 'Bench lab',
    term: 'Winter 2027',
    institution: 'Bench University (fictional)',
    timeZone: 'America/Denver',
  },
  module: { title: 'Cold-flow characterisation of a converging–diverging nozzle', version: 2 },
  owner: { kind: 'group', name: 'Group A4', members: ['Jorunn Juniper', 'Kasimir Kestrelton', 'Liesel Larkspur'] },
  attempt: 1,
  attemptsAllowed: 3,
  submittedAt: new Date('2027-02-09T17:00:00Z'),
  submittedBy: 'Jorunn Juniper',
  lateness: { isLate: true, daysLate: 1, penalty: 0.1 },
  score: { score: 8.1, maxScore: 10, rawScore: 9, computedBeforeOverride: null },
  checks: Array.from({ length: 7 }, (_, i) => ({
    label: `Reduced result ${i + 1}`,
    unit: 'N*s',
    reported: 100 + i,
    expected: 101 + i,
    relError: 0.0099,
    tolerance: 3,
    pointsAwarded: 1,
    pointsPossible: 1,
    outcome: 'pass' as const,
    adjusted: false,
  })),
  flags: [
    {
      message: 'The logged thrust is above the ideal nozzle thrust for the logged chamber pressure.',
      status: 'resolved',
      resolvedAt: new Date('2027-02-10T09:00:00Z'),
    },
  ],
  comments: [
    {
      author: 'Teaching assistant',
      at: new Date('2027-02-10T09:00:00Z'),
      paragraphs: ['Good run. Check the load-cell zero before the next one.'],
    },
    {
      author: 'Instructor',
      at: new Date('2027-02-10T10:00:00Z'),
      paragraphs: ['Agreed; see the calibration notes in the module.', 'Repeat with the larger nozzle.'],
    },
  ],
  chart: {
    time,
    thrust: time.map((t) => 25 * decay(t) + 0.2 * Math.sin(t * 50)),
    idealThrust: time.map((t) => 26 * decay(t)),
    chamberPressure: time.map((t) => 84_000 + 800_000 * decay(t)),
    receiverPressure: time.map((t) => 84_000 + 820_000 * decay(t)),
    supersonicSpans: [[2, 11.5]],
  },
  generatedAt: new Date('2027-02-10T11:00:00Z'),
}

let bytes = 0
for (let i = 0; i < WARM_UP; i++) bytes = (await feedbackPdfBuffer(data)).length
const times: number[] = []
for (let i = 0; i < ROUNDS; i++) {
  const t0 = performance.now()
  bytes = (await feedbackPdfBuffer(data)).length
  times.push(performance.now() - t0)
}
times.sort((a, b) => a - b)
const median = times[Math.floor(times.length / 2)]!
console.log(
  `feedback report PDF (${n}-sample chart, 7 checks): median ${median.toFixed(0)} ms over ${ROUNDS} renders (min ${times[0]!.toFixed(0)}, max ${times.at(-1)!.toFixed(0)}); ${(bytes / 1024).toFixed(0)} KB`,
)
