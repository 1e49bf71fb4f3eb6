import { Router, json } from 'express'
import {
  CreateModuleSchema,
  DiffQuerySchema,
  ModuleParamsSchema,
  PreviewModuleSchema,
  PublishModuleSchema,
  SaveModuleSchema,
  VersionParamsSchema,
} from '../../shared/schemas/modules'
import type { Database } from '../db/client'
import { ANY_MEMBER, INSTRUCTOR, STAFF, courseMember, enrollmentOf } from '../middleware/authorize'
import { valid, validate } from '../middleware/validate'
import {
  createModule,
  diffModuleVersions,
  editModule,
  exportModule,
  listModules,
  moduleVersionSource,
  moduleVersions,
  previewModule,
  publishModule,
  readModule,
  saveModule,
  unpublishModule,
} from '../services/module-service'

/**
 * Mounted at /api/courses/:courseId/modules. Who may call:
 * - GET    /                                  enrolled (students: published and closed modules only)
 * - POST   /                                  instructor (create from Markdown, e.g. an imported file)
 * - GET    /:moduleId                         enrolled (students: the published version; drafts are 404)
 * - GET    /:moduleId/edit                    staff (current version's source and issues)
 * - PUT    /:moduleId                         instructor (save draft)
 * - POST   /:moduleId/preview                 staff (check and render unsaved text; stores nothing)
 * - POST   /:moduleId/publish                 instructor
 * - POST   /:moduleId/unpublish               instructor
 * - GET    /:moduleId/versions                staff
 * - GET    /:moduleId/versions/:versionId     staff
 * - GET    /:moduleId/diff?from=&to=          staff
 * - GET    /:moduleId/export                  staff (Markdown file download)
 */
export function moduleRoutes(db: Database, opts: { appUrl: string; onPublished: () => void }): Router {
  const r = Router({ mergeParams: true })
  // A module may hold up to 1 MB of Markdown; JSON escaping can add to that.
  r.use(json({ limit: '3mb' }))
  const params = validate('params', ModuleParamsSchema)

  r.get('/', courseMember(db, ANY_MEMBER), async (_req, res) => {
    res.json(await listModules(db, enrollmentOf(res)))
  })

  r.post('/', courseMember(db, INSTRUCTOR), validate('body', CreateModuleSchema), async (_req, res) => {
    const { source } = valid(res, 'body', CreateModuleSchema)
    res.status(201).json(await createModule(db, enrollmentOf(res), source))
  })

  r.get('/:moduleId', courseMember(db, ANY_MEMBER), params, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await readModule(db, enrollmentOf(res), moduleId))
  })

  r.get('/:moduleId/edit', courseMember(db, STAFF), params, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await editModule(db, enrollmentOf(res), moduleId))
  })

  r.put('/:moduleId', courseMember(db, INSTRUCTOR), params, validate('body', SaveModuleSchema), async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await saveModule(db, enrollmentOf(res), moduleId, valid(res, 'body', SaveModuleSchema)))
  })

  r.post(
    '/:moduleId/preview',
    courseMember(db, STAFF),
    params,
    validate('body', PreviewModuleSchema),
    async (_req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      res.json(await previewModule(db, enrollmentOf(res), moduleId, valid(res, 'body', PreviewModuleSchema).source))
    },
  )

  r.post(
    '/:moduleId/publish',
    courseMember(db, INSTRUCTOR),
    params,
    validate('body', PublishModuleSchema),
    async (_req, res) => {
      const { moduleId } = valid(res, 'params', ModuleParamsSchema)
      const { versionId } = valid(res, 'body', PublishModuleSchema)
      const result = await publishModule(db, enrollmentOf(res), moduleId, versionId, opts.appUrl)
      opts.onPublished()
      res.json(result)
    },
  )

  r.post('/:moduleId/unpublish', courseMember(db, INSTRUCTOR), params, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await unpublishModule(db, enrollmentOf(res), moduleId))
  })

  r.get('/:moduleId/versions', courseMember(db, STAFF), params, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    res.json(await moduleVersions(db, enrollmentOf(res), moduleId))
  })

  r.get(
    '/:moduleId/versions/:versionId',
    courseMember(db, STAFF),
    validate('params', VersionParamsSchema),
    async (_req, res) => {
      const { moduleId, versionId } = valid(res, 'params', VersionParamsSchema)
      res.json(await moduleVersionSource(db, enrollmentOf(res), moduleId, versionId))
    },
  )

  r.get('/:moduleId/diff', courseMember(db, STAFF), params, validate('query', DiffQuerySchema), async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    const { from, to } = valid(res, 'query', DiffQuerySchema)
    res.json(await diffModuleVersions(db, enrollmentOf(res), moduleId, from, to))
  })

  r.get('/:moduleId/export', courseMember(db, STAFF), params, async (_req, res) => {
    const { moduleId } = valid(res, 'params', ModuleParamsSchema)
    const { filename, source } = await exportModule(db, enrollmentOf(res), moduleId)
    res.attachment(filename).type('text/markdown; charset=utf-8').send(source)
  })

  return r
}
