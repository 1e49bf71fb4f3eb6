import { gradeSubmission } from '../../shared/grading/grade'
import type { GradeInput, GradeResult } from '../../shared/grading/grade'

/**
 * Runs in a worker thread (see grading-pool.ts): the module's expressions are evaluated here, away
 * from the event loop, under the pool's time and memory budget.
 */
export default function gradeTask(input: GradeInput): GradeResult {
  return gradeSubmission(input)
}

/** Answers once the thread has loaded (the pool's warm-up). */
export function ping(): boolean {
  return true
}
