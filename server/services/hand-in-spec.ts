import type { ModuleFrontMatter } from '../../shared/modules/schema'
import type { Database } from '../db/client'
import { notFound } from '../errors'
import { findModule, findVersion } from '../repositories/modules'

/**
 * The file fields a hand-in to a published module may carry: one `table:<key>` per table and one
 * `photo:<key>` per photograph its assignment declares (none when it has no assignment). The upload layer reads this before it
 * reads the body, so a file the module does not ask for is refused as soon as its part header
 * arrives. A draft, unknown or other course's module is a 404, as for the hand-in itself; a closed
 * module still answers its fields, and the hand-in service then says it is closed.
 */
export async function handInFileFields(db: Database, courseId: number, moduleId: number): Promise<string[]> {
  const m = await findModule(db, courseId, moduleId)
  if (!m || m.status === 'draft' || m.publishedVersionId === null) throw notFound('That module')
  const v = await findVersion(db, m.publishedVersionId)
  if (!v || !v.frontMatter) throw notFound('That module')
  const fm = v.frontMatter as unknown as ModuleFrontMatter
  return [
    ...(fm.assignment?.tables ?? []).map((t) => `table:${t.key}`),
    ...(fm.assignment?.images ?? []).map((i) => `photo:${i.key}`),
  ]
}
