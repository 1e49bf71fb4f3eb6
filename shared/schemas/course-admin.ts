import { z } from 'zod'
import { CourseIdParamsSchema } from './courses'
import { singleLineName } from './names'

/**
 * Course administration by the instructor: sections, lab groups, where each person is placed
 * (section, group; a TA's section), due-date extensions, and removing someone from the course.
 * The same schemas check the browser's forms and the server's requests.
 */

const idOf = (what: string) =>
  z.coerce
    .number({ error: `${what} must be a number.` })
    .int(`${what} must be a whole number.`)
    .positive(`${what} must be a positive whole number.`)

export const SectionParamsSchema = CourseIdParamsSchema.extend({ sectionId: idOf('sectionId') })
export const LabGroupParamsSchema = CourseIdParamsSchema.extend({ labGroupId: idOf('labGroupId') })
export const MemberParamsSchema = CourseIdParamsSchema.extend({ userId: idOf('userId') })
export const ExtensionParamsSchema = CourseIdParamsSchema.extend({ moduleId: idOf('moduleId'), userId: idOf('userId') })

const sectionName = singleLineName({
  field: 'section name',
  max: 60,
  messages: {
    missing: 'name: give the section a name.',
    tooShort: 'name: give the section a name.',
    tooLong: 'name: at most 60 characters.',
  },
})
const meets = z
  .string({ error: 'meets: write when and where the section meets, or leave it empty.' })
  .trim()
  .max(120, 'meets: at most 120 characters.')

/** A new section: its name (unique in the course) and, optionally, when and where it meets. */
export const SectionCreateSchema = z.object({ name: sectionName, meets: meets.default('') })
export type SectionCreate = z.infer<typeof SectionCreateSchema>

/** Renaming a section or changing when it meets; at least one of the two. */
export const SectionUpdateSchema = z
  .object({ name: sectionName.optional(), meets: meets.optional() })
  .refine((v) => v.name !== undefined || v.meets !== undefined, 'Send a new name or a new meeting time.')
export type SectionUpdate = z.infer<typeof SectionUpdateSchema>

const groupName = singleLineName({
  field: 'lab-group name',
  max: 60,
  messages: {
    missing: 'name: give the lab group a name.',
    tooShort: 'name: give the lab group a name.',
    tooLong: 'name: at most 60 characters.',
  },
})
/** null: the group is not tied to a section and takes students of any section. */
const optionalSectionId = z
  .number({ error: 'sectionId: choose a section or none.' })
  .int()
  .positive('sectionId must be a positive whole number.')
  .nullable()

export const LabGroupCreateSchema = z.object({ name: groupName, sectionId: optionalSectionId.default(null) })
export type LabGroupCreate = z.infer<typeof LabGroupCreateSchema>

export const LabGroupUpdateSchema = z
  .object({ name: groupName.optional(), sectionId: optionalSectionId.optional() })
  .refine((v) => v.name !== undefined || v.sectionId !== undefined, 'Send a new name or a section.')
export type LabGroupUpdate = z.infer<typeof LabGroupUpdateSchema>

/**
 * Where one person is placed. A student: section and lab group; a TA: the section they look after
 * (no group). A field left out stays as it is; null means none.
 */
export const PlacementSchema = z
  .object({
    sectionId: optionalSectionId.optional(),
    labGroupId: z
      .number({ error: 'labGroupId: choose a lab group or none.' })
      .int()
      .positive('labGroupId must be a positive whole number.')
      .nullable()
      .optional(),
  })
  .refine((v) => v.sectionId !== undefined || v.labGroupId !== undefined, 'Send a section, a lab group, or both.')
export type Placement = z.infer<typeof PlacementSchema>

/** A later due date for one student on one module; `dueAt` is an instant (ISO 8601 with offset). */
export const ExtensionInputSchema = z.object({
  dueAt: z.iso
    .datetime({ offset: true, error: 'dueAt: give the new due date and time.' })
    // Stored in a TIMESTAMP column, which ends in January 2038.
    .refine((v) => Date.parse(v) < Date.parse('2038-01-01T00:00:00Z'), 'dueAt: choose a date before 2038.'),
  note: z.string().trim().max(500, 'note: at most 500 characters.').default(''),
})
export type ExtensionInput = z.infer<typeof ExtensionInputSchema>

export interface PersonRef {
  userId: number
  displayName: string
}

export interface SectionAdmin {
  id: number
  name: string
  meets: string
  studentCount: number
  tas: PersonRef[]
  labGroupCount: number
}

export interface LabGroupAdmin {
  id: number
  name: string
  sectionId: number | null
  sectionName: string | null
  members: PersonRef[]
  /** Hand-ins made by this group; a group with hand-ins cannot be deleted (rename it instead). */
  handInCount: number
}

export interface TaPlacement {
  userId: number
  displayName: string
  email: string
  sectionId: number | null
}

/** Everything the "Sections & groups" page shows. */
export interface CourseStructure {
  sections: SectionAdmin[]
  labGroups: LabGroupAdmin[]
  tas: TaPlacement[]
}

export interface ModuleWithDue {
  id: number
  title: string
  dueAt: string
}

export interface ExtensionEntry {
  moduleId: number
  moduleTitle: string
  /** The module's own due date, for comparison. */
  moduleDueAt: string
  userId: number
  displayName: string
  dueAt: string
  note: string
  grantedBy: string | null
}

export interface ExtensionOverview {
  timeZone: string
  /** Modules that have a due date: the only ones an extension makes sense for. */
  modules: ModuleWithDue[]
  extensions: ExtensionEntry[]
}
