import type { FeedbackReportData } from '../../server/reports/feedback-pdf'

/** A feedback report's data of our own (a student, no checks, a short chart), with `over` laid on top. */
export function reportData(over: Partial<FeedbackReportData> = {}): FeedbackReportData {
  const time = Array.from({ length: 120 }, (_, i) => i * 0.05)
  return {
    course: {
      code: 'PRL 341',
      title: 'Test lab',
      term: 'Winter 2027',
      institution: 'Test University (fictional)',
      timeZone: 'UTC',
    },
    module: { title: 'Cold-flow run', version: 3 },
    owner: { kind: 'student', name: 'Dalia Dunmere' },
    attempt: 1,
    attemptsAllowed: 3,
    submittedAt: new Date('2027-02-09T17:00:00Z'),
    submittedBy: 'Dalia Dunmere',
    lateness: { isLate: false, daysLate: 0, penalty: 0 },
    score: { score: 7, maxScore: 10, rawScore: 7, computedBeforeOverride: null },
    checks: [],
    flags: [],
    comments: [],
    chart: { time, thrust: time.map((t) => 30 * Math.exp(-t)), supersonicSpans: [] },
    generatedAt: new Date('2027-02-10T09:00:00Z'),
    ...over,
  }
}
