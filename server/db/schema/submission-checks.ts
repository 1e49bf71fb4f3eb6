import { boolean, double, index, json, mysqlEnum, mysqlTable, uniqueIndex, varchar } from 'drizzle-orm/mysql-core'
import type { UncertaintyContribution } from '../../../shared/grading/uncertainty'
import { id, ref, timestamps } from './columns'
import { submissions } from './submissions'

export const CHECK_OUTCOMES = ['pass', 'partial', 'fail', 'error'] as const

/** One reported result checked against the value recomputed from the submission's own data. */
export const submissionChecks = mysqlTable(
  'submission_checks',
  {
    id: id(),
    submissionId: ref('submission_id')
      .notNull()
      .references(() => submissions.id, { onDelete: 'cascade' }),
    resultKey: varchar('result_key', { length: 60 }).notNull(),
    label: varchar('label', { length: 200 }).notNull(),
    unit: varchar('unit', { length: 20 }).notNull(),
    /** Null when the student left the result out (only possible for results added by staff later). */
    reported: double('reported'),
    expected: double('expected'),
    absError: double('abs_error'),
    relError: double('rel_error'),
    /** Effective absolute tolerance in the result's unit. */
    tolerance: double('tolerance'),
    /**
     * Combined standard uncertainty of `expected` in the result's unit, propagated from the
     * module's declared instrument uncertainties; null when it declares none or none reaches this result.
     */
    standardUncertainty: double('standard_uncertainty'),
    /** Coverage factor k used with it (the tolerance's, else 2 for display); null with no uncertainty. */
    coverageFactor: double('coverage_factor'),
    /** Its largest contributions, largest first (input, part and share of the variance). */
    uncertaintyContributions: json('uncertainty_contributions').$type<UncertaintyContribution[] | null>(),
    pointsPossible: double('points_possible').notNull(),
    pointsAwarded: double('points_awarded').notNull(),
    /** Set when staff overrode the points (the audit is in grade_changes). */
    overridden: boolean('overridden').notNull().default(false),
    pass: boolean('pass').notNull(),
    outcome: mysqlEnum('outcome', CHECK_OUTCOMES).notNull(),
    error: varchar('error', { length: 1000 }),
    ...timestamps,
  },
  (t) => [
    index('submission_checks_submission_idx').on(t.submissionId),
    // One check per result of a hand-in: a grade is written once, by key, never twice.
    uniqueIndex('submission_checks_submission_result_uq').on(t.submissionId, t.resultKey),
  ],
)
