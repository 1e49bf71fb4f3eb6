import { Router } from 'express'
import {
  ExtensionInputSchema,
  ExtensionParamsSchema,
  LabGroupCreateSchema,
  LabGroupParamsSchema,
  LabGroupUpdateSchema,
  MemberParamsSchema,
  PlacementSchema,
  SectionCreateSchema,
  SectionParamsSchema,
  SectionUpdateSchema,
} from '../../shared/schemas/course-admin'
import type { Database } from '../db/client'
import { INSTRUCTOR, STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import {
  changeLabGroup,
  changeSection,
  courseStructure,
  createLabGroup,
  createSection,
  extensionOverview,
  grantExtension,
  placeMember,
  removeLabGroup,
  removeMember,
  removeSection,
  revokeExtension,
} from '../services/course-admin-service'

/**
 * Course administration, mounted at /api/courses/:courseId. Not enrolled → 404; enrolled with
 * another role → 403. Ids in the path or body that belong to another course answer 404.
 * Who may call:
 * - GET    /sections                          staff (instructor or TA): sections, lab groups, TA placements
 * - POST   /sections                          instructor: new section { name, meets }
 * - PATCH  /sections/:sectionId               instructor: rename / change "meets"
 * - DELETE /sections/:sectionId               instructor: refused (409) while students or TAs are in it
 * - POST   /lab-groups                        instructor: new lab group { name, sectionId|null }
 * - PATCH  /lab-groups/:labGroupId            instructor: rename / tie to a section
 * - DELETE /lab-groups/:labGroupId            instructor: refused (409) while it has members or hand-ins
 * - PATCH  /roster/:userId                    instructor: a student's section and lab group, a TA's section
 * - DELETE /roster/:userId                    instructor: remove from the course (enrollment only; work is kept)
 * - GET    /extensions                        staff: modules with a due date and the extensions granted
 * - PUT    /extensions/:moduleId/:userId      instructor: grant or change a student's extension
 * - DELETE /extensions/:moduleId/:userId      instructor: withdraw it
 */
export function courseAdminRoutes(db: Database): Router {
  const r = Router({ mergeParams: true })
  const staff = courseMember(db, STAFF)
  const instructor = courseMember(db, INSTRUCTOR)

  r.get('/sections', staff, async (_req, res) => {
    res.json(await courseStructure(db, enrollmentOf(res)))
  })

  r.post('/sections', instructor, validate('body', SectionCreateSchema), async (_req, res) => {
    res.status(201).json(await createSection(db, enrollmentOf(res), valid(res, 'body', SectionCreateSchema)))
  })

  r.patch(
    '/sections/:sectionId',
    instructor,
    validate('params', SectionParamsSchema),
    validate('body', SectionUpdateSchema),
    async (_req, res) => {
      const { sectionId } = valid(res, 'params', SectionParamsSchema)
      res.json(await changeSection(db, enrollmentOf(res), sectionId, valid(res, 'body', SectionUpdateSchema)))
    },
  )

  r.delete('/sections/:sectionId', instructor, validate('params', SectionParamsSchema), async (_req, res) => {
    res.json(await removeSection(db, enrollmentOf(res), valid(res, 'params', SectionParamsSchema).sectionId))
  })

  r.post('/lab-groups', instructor, validate('body', LabGroupCreateSchema), async (_req, res) => {
    res.status(201).json(await createLabGroup(db, enrollmentOf(res), valid(res, 'body', LabGroupCreateSchema)))
  })

  r.patch(
    '/lab-groups/:labGroupId',
    instructor,
    validate('params', LabGroupParamsSchema),
    validate('body', LabGroupUpdateSchema),
    async (_req, res) => {
      const { labGroupId } = valid(res, 'params', LabGroupParamsSchema)
      res.json(await changeLabGroup(db, enrollmentOf(res), labGroupId, valid(res, 'body', LabGroupUpdateSchema)))
    },
  )

  r.delete('/lab-groups/:labGroupId', instructor, validate('params', LabGroupParamsSchema), async (_req, res) => {
    res.json(await removeLabGroup(db, enrollmentOf(res), valid(res, 'params', LabGroupParamsSchema).labGroupId))
  })

  r.patch(
    '/roster/:userId',
    instructor,
    validate('params', MemberParamsSchema),
    validate('body', PlacementSchema),
    async (_req, res) => {
      await placeMember(
        db,
        enrollmentOf(res),
        valid(res, 'params', MemberParamsSchema).userId,
        valid(res, 'body', PlacementSchema),
      )
      res.status(204).end()
    },
  )

  r.delete('/roster/:userId', instructor, validate('params', MemberParamsSchema), async (_req, res) => {
    await removeMember(db, enrollmentOf(res), valid(res, 'params', MemberParamsSchema).userId)
    res.status(204).end()
  })

  r.get('/extensions', staff, async (_req, res) => {
    res.json(await extensionOverview(db, enrollmentOf(res)))
  })

  r.put(
    '/extensions/:moduleId/:userId',
    instructor,
    validate('params', ExtensionParamsSchema),
    validate('body', ExtensionInputSchema),
    async (_req, res) => {
      const { moduleId, userId } = valid(res, 'params', ExtensionParamsSchema)
      res.json(await grantExtension(db, enrollmentOf(res), moduleId, userId, valid(res, 'body', ExtensionInputSchema)))
    },
  )

  r.delete(
    '/extensions/:moduleId/:userId',
    instructor,
    validate('params', ExtensionParamsSchema),
    async (_req, res) => {
      const { moduleId, userId } = valid(res, 'params', ExtensionParamsSchema)
      res.json(await revokeExtension(db, enrollmentOf(res), moduleId, userId))
    },
  )

  return r
}
