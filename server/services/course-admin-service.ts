import type {
  CourseStructure,
  ExtensionEntry,
  ExtensionInput,
  ExtensionOverview,
  LabGroupCreate,
  LabGroupUpdate,
  Placement,
  SectionCreate,
  SectionUpdate,
} from '../../shared/schemas/course-admin'
import { formatInZone } from '../../shared/time'
import type { Database, Executor } from '../db/client'
import { AppError, notFound } from '../errors'
import type { CourseEnrollment } from '../repositories/enrollments'
import {
  deleteEnrollment,
  deleteLabGroup,
  deleteSection,
  findLabGroup,
  findMember,
  findSection,
  groupHandInCount,
  groupMembers,
  insertLabGroup,
  insertSection,
  listLabGroupsAdmin,
  listSectionsAdmin,
  listTaPlacements,
  lockInstructors,
  sectionHeadcount,
  setPlacement,
  updateLabGroup,
  updateSection,
} from '../repositories/course-admin'
import {
  deleteExtension,
  findModuleDue,
  listExtensions,
  listModulesWithDue,
  upsertExtension,
} from '../repositories/due-extensions'
import { courseTimeZone } from '../repositories/modules'

/**
 * Course administration: sections, lab groups, placements, extensions and removal. The routes
 * allow only the course's instructor to change anything; every id is looked up within the
 * course, so an id from another course is "not found". Each change runs in one transaction.
 *
 * Choices (the screens say the same):
 * - A section with students or TAs in it is not deleted (409); its lab groups are kept, untied.
 * - A lab group with members or hand-ins is not deleted (409): deleting it would detach the
 *   group's hand-ins from its members.
 * - A lab group tied to a section takes only students of that section; putting a student in
 *   such a group moves them to its section.
 */

function isDuplicate(err: unknown): boolean {
  let e: unknown = err
  for (let i = 0; e && i < 4; i++) {
    if ((e as { code?: string }).code === 'ER_DUP_ENTRY') return true
    e = (e as { cause?: unknown }).cause
  }
  return false
}

const duplicateName = (what: 'section' | 'lab group', name: string) =>
  new AppError(
    what === 'section' ? 'section_exists' : 'lab_group_exists',
    `There is already a ${what} named “${name}” in this course; choose another name.`,
    409,
    {
      field: 'name',
    },
  )

export async function courseStructure(db: Database, e: CourseEnrollment): Promise<CourseStructure> {
  const [sections, labGroups, tas] = await Promise.all([
    listSectionsAdmin(db, e.courseId),
    listLabGroupsAdmin(db, e.courseId),
    listTaPlacements(db, e.courseId),
  ])
  return { sections, labGroups, tas }
}

export async function createSection(db: Database, e: CourseEnrollment, input: SectionCreate): Promise<CourseStructure> {
  try {
    await db.transaction((tx) => insertSection(tx, e.courseId, input))
  } catch (err) {
    if (isDuplicate(err)) throw duplicateName('section', input.name)
    throw err
  }
  return courseStructure(db, e)
}

export async function changeSection(
  db: Database,
  e: CourseEnrollment,
  sectionId: number,
  input: SectionUpdate,
): Promise<CourseStructure> {
  try {
    await db.transaction(async (tx) => {
      if (!(await findSection(tx, e.courseId, sectionId, true))) throw notFound('That section')
      await updateSection(tx, sectionId, input)
    })
  } catch (err) {
    if (isDuplicate(err)) throw duplicateName('section', input.name ?? '')
    throw err
  }
  return courseStructure(db, e)
}

export async function removeSection(db: Database, e: CourseEnrollment, sectionId: number): Promise<CourseStructure> {
  await db.transaction(async (tx) => {
    const s = await findSection(tx, e.courseId, sectionId, true)
    if (!s) throw notFound('That section')
    const n = await sectionHeadcount(tx, sectionId)
    if (n.student > 0 || n.ta > 0) {
      const who = [
        n.student ? `${n.student} student${n.student === 1 ? '' : 's'}` : '',
        n.ta ? `${n.ta} TA${n.ta === 1 ? '' : 's'}` : '',
      ]
        .filter(Boolean)
        .join(' and ')
      throw new AppError(
        'section_not_empty',
        `Section “${s.name}” still has ${who}. Move them to another section (or to none) first.`,
        409,
        {
          students: n.student,
          tas: n.ta,
        },
      )
    }
    // Lab groups tied to it stay, untied (the foreign key sets their section to null).
    await deleteSection(tx, sectionId)
  })
  return courseStructure(db, e)
}

async function sectionInCourse(tx: Executor, courseId: number, sectionId: number | null | undefined): Promise<void> {
  if (sectionId === null || sectionId === undefined) return
  if (!(await findSection(tx, courseId, sectionId))) throw notFound('That section')
}

export async function createLabGroup(
  db: Database,
  e: CourseEnrollment,
  input: LabGroupCreate,
): Promise<CourseStructure> {
  try {
    await db.transaction(async (tx) => {
      await sectionInCourse(tx, e.courseId, input.sectionId)
      await insertLabGroup(tx, e.courseId, input)
    })
  } catch (err) {
    if (isDuplicate(err)) throw duplicateName('lab group', input.name)
    throw err
  }
  return courseStructure(db, e)
}

export async function changeLabGroup(
  db: Database,
  e: CourseEnrollment,
  labGroupId: number,
  input: LabGroupUpdate,
): Promise<CourseStructure> {
  try {
    await db.transaction(async (tx) => {
      const g = await findLabGroup(tx, e.courseId, labGroupId, true)
      if (!g) throw notFound('That lab group')
      await sectionInCourse(tx, e.courseId, input.sectionId)
      if (input.sectionId !== undefined && input.sectionId !== null && input.sectionId !== g.sectionId) {
        const elsewhere = (await groupMembers(tx, labGroupId)).filter((m) => m.sectionId !== input.sectionId)
        if (elsewhere.length) {
          throw new AppError(
            'section_mismatch',
            `${elsewhere.map((m) => m.displayName).join(', ')} ${elsewhere.length === 1 ? 'is' : 'are'} in another section; a group tied to a section takes only students of that section. Move them first, or leave the group untied.`,
            409,
            { field: 'sectionId' },
          )
        }
      }
      await updateLabGroup(tx, labGroupId, input)
    })
  } catch (err) {
    if (isDuplicate(err)) throw duplicateName('lab group', input.name ?? '')
    throw err
  }
  return courseStructure(db, e)
}

export async function removeLabGroup(db: Database, e: CourseEnrollment, labGroupId: number): Promise<CourseStructure> {
  await db.transaction(async (tx) => {
    const g = await findLabGroup(tx, e.courseId, labGroupId, true)
    if (!g) throw notFound('That lab group')
    const members = await groupMembers(tx, labGroupId)
    if (members.length) {
      throw new AppError(
        'lab_group_not_empty',
        `Lab group “${g.name}” still has ${members.length} member${members.length === 1 ? '' : 's'}. Move them out first.`,
        409,
      )
    }
    const handIns = await groupHandInCount(tx, labGroupId)
    if (handIns) {
      throw new AppError(
        'lab_group_has_hand_ins',
        `Lab group “${g.name}” has ${handIns} hand-in${handIns === 1 ? '' : 's'}; deleting it would detach them from the group. Rename it instead.`,
        409,
      )
    }
    await deleteLabGroup(tx, labGroupId)
  })
  return courseStructure(db, e)
}

/**
 * Moves a student to a section and/or lab group, or sets the section a TA looks after. A student
 * put in a group tied to a section moves to that section. Existing hand-ins keep the group they
 * were made for; only future hand-ins follow the new group.
 */
export async function placeMember(db: Database, e: CourseEnrollment, userId: number, input: Placement): Promise<void> {
  await db.transaction(async (tx) => {
    const m = await findMember(tx, e.courseId, userId, true)
    if (!m) throw notFound('That person')
    if (m.role === 'instructor') {
      throw new AppError(
        'not_placeable',
        `${m.displayName} is an instructor; instructors have no section or lab group.`,
        409,
      )
    }
    await sectionInCourse(tx, e.courseId, input.sectionId)
    if (m.role === 'ta') {
      if (input.labGroupId !== undefined && input.labGroupId !== null) {
        throw new AppError(
          'not_placeable',
          `${m.displayName} is a teaching assistant; TAs look after a section and are not in lab groups.`,
          409,
          { field: 'labGroupId' },
        )
      }
      await setPlacement(tx, e.courseId, userId, {
        sectionId: input.sectionId === undefined ? m.sectionId : input.sectionId,
        labGroupId: null,
      })
      return
    }
    const labGroupId = input.labGroupId === undefined ? m.labGroupId : input.labGroupId
    let sectionId = input.sectionId === undefined ? m.sectionId : input.sectionId
    const g = labGroupId === null ? null : await findLabGroup(tx, e.courseId, labGroupId)
    if (labGroupId !== null && !g) throw notFound('That lab group')
    if (g && g.sectionId !== null && g.sectionId !== sectionId) {
      if (input.labGroupId !== undefined && input.sectionId === undefined) {
        // Chosen group, section not chosen: the student follows the group to its section.
        sectionId = g.sectionId
      } else {
        const groupSection = await findSection(tx, e.courseId, g.sectionId)
        throw new AppError(
          'section_mismatch',
          `Lab group “${g.name}” belongs to section “${groupSection?.name ?? '?'}”; put ${m.displayName} in that section, or choose a group of the new section (or no group).`,
          409,
          { field: 'labGroupId' },
        )
      }
    }
    await setPlacement(tx, e.courseId, userId, { sectionId, labGroupId })
  })
}

/**
 * Removes a person from the course: the enrollment only. Their submissions, grades, grade-change
 * audit rows and extensions stay. An instructor cannot remove themself, and the last instructor
 * is never removed.
 */
export async function removeMember(db: Database, e: CourseEnrollment, userId: number): Promise<void> {
  await db.transaction(async (tx) => {
    const m = await findMember(tx, e.courseId, userId, true)
    if (!m) throw notFound('That person')
    const instructors = m.role === 'instructor' ? await lockInstructors(tx, e.courseId) : []
    if (m.role === 'instructor' && instructors.length <= 1) {
      throw new AppError(
        'last_instructor',
        `${m.displayName} is the only instructor of this course and cannot be removed.`,
        409,
      )
    }
    if (userId === e.userId) {
      throw new AppError(
        'cannot_remove_self',
        'You cannot remove yourself from the course; ask another instructor to do it.',
        409,
      )
    }
    await deleteEnrollment(tx, e.courseId, userId)
  })
}

export async function extensionOverview(db: Database, e: CourseEnrollment): Promise<ExtensionOverview> {
  const [course, modules, rows] = await Promise.all([
    courseTimeZone(db, e.courseId),
    listModulesWithDue(db, e.courseId),
    listExtensions(db, e.courseId),
  ])
  const byId = new Map(modules.map((m) => [m.id, m]))
  const extensions: ExtensionEntry[] = rows.flatMap((r) => {
    const m = byId.get(r.moduleId)
    // A module whose due date was since removed: its extensions have no meaning; not listed.
    if (!m) return []
    return [{ ...r, moduleTitle: m.title, moduleDueAt: m.dueAt.toISOString(), dueAt: r.dueAt.toISOString() }]
  })
  return {
    timeZone: course.timeZone,
    modules: modules.map((m) => ({ id: m.id, title: m.title, dueAt: m.dueAt.toISOString() })),
    extensions,
  }
}

/** Grants or changes one student's extension; the new due date must be after the module's. */
export async function grantExtension(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  userId: number,
  input: ExtensionInput,
): Promise<ExtensionOverview> {
  await db.transaction(async (tx) => {
    const mod = await findModuleDue(tx, e.courseId, moduleId)
    if (!mod) throw notFound('That module')
    const m = await findMember(tx, e.courseId, userId)
    if (!m) throw notFound('That person')
    if (m.role !== 'student')
      throw new AppError(
        'not_a_student',
        `${m.displayName} is not a student of this course; only students hand in work.`,
        409,
      )
    if (!mod.dueAt)
      throw new AppError('no_due_date', `“${mod.title}” has no due date, so there is nothing to extend.`, 409, {
        field: 'moduleId',
      })
    const dueAt = new Date(input.dueAt)
    if (dueAt.getTime() <= mod.dueAt.getTime()) {
      const { timeZone } = await courseTimeZone(tx, e.courseId)
      throw new AppError(
        'extension_not_later',
        `dueAt: the extended due date must be after the module’s own, ${formatInZone(mod.dueAt, timeZone)}.`,
        400,
        {
          field: 'dueAt',
        },
      )
    }
    await upsertExtension(tx, { moduleId, userId, dueAt, note: input.note, grantedBy: e.userId })
  })
  return extensionOverview(db, e)
}

export async function revokeExtension(
  db: Database,
  e: CourseEnrollment,
  moduleId: number,
  userId: number,
): Promise<ExtensionOverview> {
  await db.transaction(async (tx) => {
    if (!(await findModuleDue(tx, e.courseId, moduleId))) throw notFound('That module')
    if ((await deleteExtension(tx, moduleId, userId)) === 0) throw notFound('That extension')
  })
  return extensionOverview(db, e)
}
