/**
 * A module's front matter as a student receives it: the one list of what a student may see of a
 * module's spec. The server parses the stored front matter with it before it answers a student
 * (zod drops every key not named here, so a field added to the spec later stays with staff until
 * it is named here on purpose); the hand-in form reads the answer with the same schema.
 *
 * Kept back: the expected-value expressions, the regime's ratio expressions and γ, tolerances,
 * partial credit, declared uncertainties, instrument full scales, transducer zeroing and review rules.
 *
 * The fields are read leniently (plain strings and numbers): the stored front matter was checked
 * with the full schema when it was saved, and a student's page should not break on a rule that
 * has since become stricter.
 */
import { z } from 'zod'

const Sense = z.enum(['gauge', 'absolute'])

const StudentColumnSchema = z.object({
  key: z.string(),
  label: z.string(),
  unit: z.string(),
  pressure: Sense.optional(),
  role: z.enum(['time', 'thrust', 'chamber-pressure', 'receiver-pressure']).optional(),
})

const StudentTableSchema = z.object({
  key: z.string(),
  label: z.string(),
  /** Fewest data rows the log must have (the browser's check of the log uses it). */
  minRows: z.number().default(10),
  columns: z.array(StudentColumnSchema),
})

const StudentMeasurementSchema = z.object({
  key: z.string(),
  label: z.string(),
  unit: z.string(),
  /** The plausible range, which the form states next to the field. */
  min: z.number().optional(),
  max: z.number().optional(),
  pressure: Sense.optional(),
  role: z.enum(['ambient-pressure', 'throat-diameter', 'exit-diameter', 'receiver-volume']).optional(),
})

const StudentResultSchema = z.object({
  key: z.string(),
  label: z.string(),
  unit: z.string(),
  points: z.number(),
  /** Present when the result is an expansion-regime code: the form offers the regimes by name. */
  regime: z.object({ margin: z.number().optional() }).optional(),
})

/** A photograph to hand in with marks (shared/modules/image-spec.ts); `theory` names results, kept back. */
const StudentImageSchema = z.object({
  key: z.string(),
  label: z.string(),
  instructions: z.string().optional(),
  cells: z.object({ min: z.number(), max: z.number() }).default({ min: 1, max: 8 }),
  machDisk: z.enum(['required', 'optional', 'none']).default('optional'),
  /** The length measurement whose typed value is the scale's known length by default. */
  scaleFrom: z.string().optional(),
  /** The time measurement that says when the photograph was taken. */
  takenAt: z.string().optional(),
})

export const StudentAssignmentSchema = z.object({
  tables: z.array(StudentTableSchema).default([]),
  measurements: z.array(StudentMeasurementSchema).default([]),
  images: z.array(StudentImageSchema).default([]),
  results: z.array(StudentResultSchema).default([]),
})

export const StudentModuleSpecSchema = z.object({
  title: z.string(),
  summary: z.string().optional(),
  due: z.object({ at: z.string(), timeZone: z.string().optional() }).optional(),
  attempts: z.number().default(3),
  late: z.object({ acceptUntil: z.string().optional(), penaltyPerDay: z.number() }).optional(),
  results: z.enum(['immediately', 'after-due', 'after-release']).default('immediately'),
  showExpected: z.boolean().default(false),
  groupSubmission: z.boolean().default(false),
  assignment: StudentAssignmentSchema.optional(),
  /** A hand-in needs a signed-off stand run of the student's lab group (the form says so and offers the runs). */
  requiresSignedRun: z.boolean().default(false),
})

export type StudentModuleSpec = z.output<typeof StudentModuleSpecSchema>
export type StudentAssignment = z.output<typeof StudentAssignmentSchema>
export type StudentImageSpec = StudentAssignment['images'][number]
export type StudentResultSpec = StudentAssignment['results'][number]
