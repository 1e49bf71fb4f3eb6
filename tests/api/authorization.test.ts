import { readFileSync } from 'node:fs'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { and, eq } from 'drizzle-orm'
import {
  bookings,
  courses,
  dueExtensions,
  enrollments,
  labGroups,
  modules,
  recheckRequests,
  runRecords,
  sections,
  standSlots,
  stands,
  users,
} from '../../server/db/schema'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { listRoutes } from '../helpers/routes'
import { JET_SHEET, jetPayload, jetPhotoFile } from '../helpers/jet-photo'
import { standCases } from '../helpers/stand-matrix'

/**
 * The authorization matrix: for every API route, the status each kind of caller gets.
 * "outsider" is signed in but not enrolled in the fixture course. A course you are not in
 * answers 404 (it does not exist for you); the wrong role in your own course answers 403.
 */
type Who = 'anon' | 'outsider' | 'student' | 'ta' | 'instructor' | 'admin'
interface Case {
  route: string
  call: (c: Client, fx: Fixture) => Promise<{ status: number }>
  expect: Record<Who, number>
}

const newCourse = () => ({
  code: `N${Math.random().toString(36).slice(2, 8)}`,
  title: 'Matrix-created course',
  term: 'Test term',
  institution: 'Test University (fictional)',
  timeZone: 'America/Denver',
})

// Modules made in beforeAll: one published (read by everyone), one for the unpublish row.
const mods: { published?: CreatedModule; toUnpublish?: CreatedModule; coldFlow?: CreatedModule; jet?: CreatedModule } =
  {}
const handIn: { submissionId?: number; fileId?: number; flagId?: number; photoSubmissionId?: number } = {}
const M = (fx: Fixture) => `/api/courses/${fx.courseId}/modules`
const pub = () => mods.published!.id
const C = (fx: Fixture) => `/api/courses/${fx.courseId}`
/** The fixture's lab group G1. */
async function groupG1(fx: Fixture): Promise<number> {
  const [g] = await ctx.handle.db
    .select({ id: labGroups.id })
    .from(labGroups)
    .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
  return g!.id
}

/** Reads a binary body and throws it away (the matrix checks only the status). */
function ignoreBody(res: NodeJS.ReadableStream, cb: (err: Error | null, body: null) => void) {
  res.on('data', () => {})
  res.on('end', () => cb(null, null))
}

const CASES: Case[] = [
  {
    route: 'GET /api/health',
    call: (c) => c.agent.get('/api/health'),
    expect: { anon: 200, outsider: 200, student: 200, ta: 200, instructor: 200, admin: 200 },
  },
  {
    route: 'GET /api/auth/session',
    call: (c) => c.agent.get('/api/auth/session'),
    expect: { anon: 200, outsider: 200, student: 200, ta: 200, instructor: 200, admin: 200 },
  },
  {
    route: 'POST /api/auth/sign-in',
    // Wrong password for whoever calls: only the credentials decide, never the caller's session.
    call: (c) =>
      c.agent
        .post('/api/auth/sign-in')
        .set('x-csrf-token', c.csrf)
        .send({ email: `nobody-${Math.random().toString(36).slice(2)}@test.example`, password: 'wrong' }),
    expect: { anon: 401, outsider: 401, student: 401, ta: 401, instructor: 401, admin: 401 },
  },
  {
    route: 'POST /api/auth/sign-out',
    call: (c) => c.agent.post('/api/auth/sign-out').set('x-csrf-token', c.csrf),
    expect: { anon: 200, outsider: 200, student: 200, ta: 200, instructor: 200, admin: 200 },
  },
  {
    route: 'GET /api/courses',
    call: (c) => c.agent.get('/api/courses'),
    expect: { anon: 401, outsider: 200, student: 200, ta: 200, instructor: 200, admin: 200 },
  },
  {
    route: 'POST /api/courses',
    call: (c) => c.agent.post('/api/courses').set('x-csrf-token', c.csrf).send(newCourse()),
    expect: { anon: 401, outsider: 403, student: 403, ta: 403, instructor: 403, admin: 201 },
  },
  {
    route: 'GET /api/courses/:courseId',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/course-keys/:courseSlug',
    call: (c, fx) => c.agent.get(`/api/course-keys/${fx.courseSlug}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/course-keys/by-id/:courseId',
    call: (c, fx) => c.agent.get(`/api/course-keys/by-id/${fx.courseId}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/roster',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/roster`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  // End of term: the archive, closing and reopening. Each success is undone at once, so the
  // fixture course stays open for the cases that follow.
  {
    route: 'GET /api/courses/:courseId/archive.zip',
    call: (c, fx) =>
      c.agent
        .get(`${C(fx)}/archive.zip`)
        .buffer(true)
        .parse(ignoreBody as never),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 200 },
  },
  {
    route: 'POST /api/courses/:courseId/close',
    call: async (c, fx) => {
      const [row] = await ctx.handle.db.select({ code: courses.code }).from(courses).where(eq(courses.id, fx.courseId))
      const res = await c.agent
        .post(`${C(fx)}/close`)
        .set('x-csrf-token', c.csrf)
        .send({ confirmCode: row!.code })
      await ctx.handle.db.update(courses).set({ closedAt: null }).where(eq(courses.id, fx.courseId))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/reopen',
    call: async (c, fx) => {
      await ctx.handle.db.update(courses).set({ closedAt: new Date() }).where(eq(courses.id, fx.courseId))
      const res = await c.agent.post(`${C(fx)}/reopen`).set('x-csrf-token', c.csrf)
      await ctx.handle.db.update(courses).set({ closedAt: null }).where(eq(courses.id, fx.courseId))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  // Roster import and invitations
  {
    route: 'POST /api/courses/:courseId/roster/import/preview',
    call: (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/roster/import/preview`)
        .set('x-csrf-token', c.csrf)
        .send({ csv: `email,name\n${fx.student.email},Student\n` }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    // The fixture student as the file lists them already: the import succeeds and changes nothing,
    // so the counts the tests below check stay as seeded.
    route: 'POST /api/courses/:courseId/roster/import',
    call: (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/roster/import`)
        .set('x-csrf-token', c.csrf)
        .send({ csv: `email,name\n${fx.student.email},Student\n` }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    // Public: the token is the only credential; an unknown one is 404 for everyone.
    route: 'GET /api/auth/invitations/:token',
    call: (c) => c.agent.get(`/api/auth/invitations/unknown-${Math.random().toString(36).slice(2)}`),
    expect: { anon: 404, outsider: 404, student: 404, ta: 404, instructor: 404, admin: 404 },
  },
  {
    route: 'POST /api/auth/invitations/:token',
    call: (c) =>
      c.agent
        .post(`/api/auth/invitations/unknown-${Math.random().toString(36).slice(2)}`)
        .set('x-csrf-token', c.csrf)
        .send({ password: 'matrix-password-1' }),
    expect: { anon: 404, outsider: 404, student: 404, ta: 404, instructor: 404, admin: 404 },
  },
  // Sections, lab groups, TAs, extensions, removal
  // Every instructor success here is undone (or repeats the fixture's own values), so the fixture
  // keeps its two sections, one group and head counts for the cases and checks that follow.
  {
    route: 'GET /api/courses/:courseId/sections',
    call: (c, fx) => c.agent.get(`${C(fx)}/sections`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/sections',
    call: async (c, fx) => {
      const name = `Matrix ${uniq()}`
      const res = await c.agent
        .post(`${C(fx)}/sections`)
        .set('x-csrf-token', c.csrf)
        .send({ name })
      await ctx.handle.db.delete(sections).where(and(eq(sections.courseId, fx.courseId), eq(sections.name, name)))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 201, admin: 404 },
  },
  {
    route: 'PATCH /api/courses/:courseId/sections/:sectionId',
    call: (c, fx) =>
      c.agent
        .patch(`${C(fx)}/sections/${fx.sectionA}`)
        .set('x-csrf-token', c.csrf)
        .send({ name: 'A' }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'DELETE /api/courses/:courseId/sections/:sectionId',
    call: async (c, fx) => {
      const [row] = await ctx.handle.db
        .insert(sections)
        .values({ courseId: fx.courseId, name: `Matrix ${uniq()}` })
        .$returningId()
      const res = await c.agent.delete(`${C(fx)}/sections/${row!.id}`).set('x-csrf-token', c.csrf)
      await ctx.handle.db.delete(sections).where(eq(sections.id, row!.id))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/lab-groups',
    call: async (c, fx) => {
      const name = `Matrix ${uniq()}`
      const res = await c.agent
        .post(`${C(fx)}/lab-groups`)
        .set('x-csrf-token', c.csrf)
        .send({ name, sectionId: fx.sectionA })
      await ctx.handle.db.delete(labGroups).where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, name)))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 201, admin: 404 },
  },
  {
    route: 'PATCH /api/courses/:courseId/lab-groups/:labGroupId',
    call: async (c, fx) =>
      c.agent
        .patch(`${C(fx)}/lab-groups/${await groupG1(fx)}`)
        .set('x-csrf-token', c.csrf)
        .send({ name: 'G1' }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'DELETE /api/courses/:courseId/lab-groups/:labGroupId',
    call: async (c, fx) => {
      const [row] = await ctx.handle.db
        .insert(labGroups)
        .values({ courseId: fx.courseId, name: `Matrix ${uniq()}` })
        .$returningId()
      const res = await c.agent.delete(`${C(fx)}/lab-groups/${row!.id}`).set('x-csrf-token', c.csrf)
      await ctx.handle.db.delete(labGroups).where(eq(labGroups.id, row!.id))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'PATCH /api/courses/:courseId/roster/:userId',
    // The fixture student's own section again: group G1 is in section A, so nothing changes.
    call: (c, fx) =>
      c.agent
        .patch(`${C(fx)}/roster/${fx.student.id}`)
        .set('x-csrf-token', c.csrf)
        .send({ sectionId: fx.sectionA }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 204, admin: 404 },
  },
  {
    route: 'DELETE /api/courses/:courseId/roster/:userId',
    // A throw-away student enrolled for this call only.
    call: async (c, fx) => {
      const tag = uniq()
      const [u] = await ctx.handle.db
        .insert(users)
        .values({ email: `matrix.${tag}@test.example`, displayName: `Matrix ${tag}` })
        .$returningId()
      await ctx.handle.db.insert(enrollments).values({ userId: u!.id, courseId: fx.courseId, role: 'student' })
      const res = await c.agent.delete(`${C(fx)}/roster/${u!.id}`).set('x-csrf-token', c.csrf)
      await ctx.handle.db
        .delete(enrollments)
        .where(and(eq(enrollments.userId, u!.id), eq(enrollments.courseId, fx.courseId)))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 204, admin: 404 },
  },
  // Calendar feeds: /api/me/* is about the caller only; the feed itself needs its token, not a session.
  {
    route: 'GET /api/me/calendar-feed',
    call: (c) => c.agent.get('/api/me/calendar-feed'),
    expect: { anon: 401, outsider: 200, student: 200, ta: 200, instructor: 200, admin: 200 },
  },
  {
    route: 'POST /api/me/calendar-feed',
    call: (c) => c.agent.post('/api/me/calendar-feed').set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 201, student: 201, ta: 201, instructor: 201, admin: 201 },
  },
  {
    route: 'DELETE /api/me/calendar-feed',
    call: (c) => c.agent.delete('/api/me/calendar-feed').set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 204, student: 204, ta: 204, instructor: 204, admin: 204 },
  },
  {
    route: 'GET /api/calendar/:token.ics',
    // A well-formed token nobody holds: the same 404 whoever asks (a session grants nothing here).
    call: (c) => c.agent.get(`/api/calendar/${'A'.repeat(43)}.ics`),
    expect: { anon: 404, outsider: 404, student: 404, ta: 404, instructor: 404, admin: 404 },
  },
  // The course home's week at the stand: every member reads it (each sees only their own share).
  {
    route: 'GET /api/courses/:courseId/week',
    call: (c, fx) => c.agent.get(`${C(fx)}/week?start=2027-03-01`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/extensions',
    call: (c, fx) => c.agent.get(`${C(fx)}/extensions`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'PUT /api/courses/:courseId/extensions/:moduleId/:userId',
    call: (c, fx) =>
      c.agent
        .put(`${C(fx)}/extensions/${mods.coldFlow!.id}/${fx.student.id}`)
        .set('x-csrf-token', c.csrf)
        .send({ dueAt: '2030-01-01T12:00:00Z', note: 'Matrix extension.' }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'DELETE /api/courses/:courseId/extensions/:moduleId/:userId',
    call: async (c, fx) => {
      const key = { moduleId: mods.coldFlow!.id, userId: fx.student.id }
      await ctx.handle.db
        .insert(dueExtensions)
        .values({ ...key, dueAt: new Date('2030-01-01T12:00:00Z') })
        .onDuplicateKeyUpdate({ set: { note: '' } })
      const res = await c.agent.delete(`${C(fx)}/extensions/${key.moduleId}/${key.userId}`).set('x-csrf-token', c.csrf)
      await ctx.handle.db
        .delete(dueExtensions)
        .where(and(eq(dueExtensions.moduleId, key.moduleId), eq(dueExtensions.userId, key.userId)))
      return res
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules',
    call: (c, fx) => c.agent.get(M(fx)),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/modules',
    call: (c, fx) =>
      c.agent
        .post(M(fx))
        .set('x-csrf-token', c.csrf)
        .send({ source: moduleSource('Matrix module') }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 201, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/edit',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}/edit`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'PUT /api/courses/:courseId/modules/:moduleId',
    call: async (c, fx) => {
      // The caller's own view of the current version, when they may see it (else any id).
      const ed = await c.agent.get(`${M(fx)}/${pub()}/edit`)
      const baseVersionId = ed.status === 200 ? (ed.body.current.id as number) : 1
      return c.agent
        .put(`${M(fx)}/${pub()}`)
        .set('x-csrf-token', c.csrf)
        .send({ source: moduleSource('Published for the matrix', `Edited at ${Date.now()}.`), baseVersionId })
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/modules/:moduleId/preview',
    call: (c, fx) =>
      c.agent
        .post(`${M(fx)}/${pub()}/preview`)
        .set('x-csrf-token', c.csrf)
        .send({ source: moduleSource('Previewed for the matrix') }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/modules/:moduleId/publish',
    call: async (c, fx) => {
      // The instructor publishes a fresh module of their own; others try the same on the published one.
      if ((await c.agent.get(`${M(fx)}/${pub()}/edit`)).status === 200) {
        const me = await c.agent.get('/api/auth/session')
        if (me.body.user?.email === fx.instructor.email) {
          const m = await createModuleAs(c, fx.courseId, moduleSource('Publish row'))
          return c.agent
            .post(`${M(fx)}/${m.id}/publish`)
            .set('x-csrf-token', c.csrf)
            .send({ versionId: m.versionId })
        }
      }
      return c.agent
        .post(`${M(fx)}/${pub()}/publish`)
        .set('x-csrf-token', c.csrf)
        .send({ versionId: 1 })
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/modules/:moduleId/unpublish',
    call: (c, fx) => c.agent.post(`${M(fx)}/${mods.toUnpublish!.id}/unpublish`).set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/versions',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}/versions`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/versions/:versionId',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}/versions/${mods.published!.versionId}`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/diff',
    call: (c, fx) =>
      c.agent.get(`${M(fx)}/${pub()}/diff?from=${mods.published!.versionId}&to=${mods.published!.versionId}`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/modules/:moduleId/submissions',
    // The reading module has nothing to hand in: a student reaches the service (409), staff are refused.
    call: (c, fx) =>
      c.agent
        .post(`${M(fx)}/${pub()}/submissions`)
        .set('x-csrf-token', c.csrf)
        .field('payload', '{}'),
    expect: { anon: 401, outsider: 404, student: 409, ta: 403, instructor: 403, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/submissions/mine',
    call: (c, fx) => c.agent.get(`${M(fx)}/${mods.coldFlow!.id}/submissions/mine`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId/files/:fileId',
    call: (c, fx) =>
      c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/files/${handIn.fileId}`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId/images/:imageKey',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.photoSubmissionId}/images/jet`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/review',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/review`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId/review',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/review`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/overrides',
    call: async (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/overrides`)
        .set('x-csrf-token', c.csrf)
        .send({
          checkId: null,
          points: 1,
          reason: 'Authorization matrix check.',
          revision: await revisionSeenBy(c, fx),
        }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/comments',
    call: async (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/comments`)
        .set('x-csrf-token', c.csrf)
        .send({ body: 'Matrix comment.', revision: await revisionSeenBy(c, fx) }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 201, instructor: 201, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/flags/:flagId',
    call: async (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/flags/${handIn.flagId}`)
        .set('x-csrf-token', c.csrf)
        .send({ action: 'resolve', revision: await revisionSeenBy(c, fx) }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/review-status',
    call: async (c, fx) =>
      c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/review-status`)
        .set('x-csrf-token', c.csrf)
        .send({ status: 'in-review', revision: await revisionSeenBy(c, fx) }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  // Feedback reports
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId/report.pdf',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/report.pdf`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/reports.zip',
    call: (c, fx) => c.agent.get(`${M(fx)}/${mods.coldFlow!.id}/reports.zip`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/export',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}/export`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  // Gradebook, release, my grades, re-check requests
  {
    route: 'GET /api/courses/:courseId/gradebook',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/gradebook`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/gradebook.csv',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/gradebook.csv`),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'PUT /api/courses/:courseId/gradebook/modules/:moduleId/weight',
    call: (c, fx) =>
      c.agent
        .put(`/api/courses/${fx.courseId}/gradebook/modules/${pub()}/weight`)
        .set('x-csrf-token', c.csrf)
        .send({ weight: 1 }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/gradebook/modules/:moduleId/release',
    call: (c, fx) =>
      c.agent.post(`/api/courses/${fx.courseId}/gradebook/modules/${pub()}/release`).set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'DELETE /api/courses/:courseId/gradebook/modules/:moduleId/release',
    call: (c, fx) =>
      c.agent.delete(`/api/courses/${fx.courseId}/gradebook/modules/${pub()}/release`).set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/my-grades',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/my-grades`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 403, instructor: 403, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/submissions/:submissionId/recheck',
    call: (c, fx) => c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/recheck`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/recheck',
    call: async (c, fx) => {
      // A re-check needs final marks: release the hand-in's module first (as the instructor would).
      await ctx.handle.db.update(modules).set({ gradesReleasedAt: new Date() }).where(eq(modules.id, mods.coldFlow!.id))
      await ctx.handle.db.delete(recheckRequests).where(eq(recheckRequests.submissionId, handIn.submissionId!))
      return c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/recheck`)
        .set('x-csrf-token', c.csrf)
        .send({ message: 'Matrix re-check.' })
    },
    expect: { anon: 401, outsider: 404, student: 201, ta: 403, instructor: 403, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/submissions/:submissionId/recheck/:requestId/answer',
    call: async (c, fx) => {
      // A fresh open request for each caller, so every row answers an open one.
      const [row] = await ctx.handle.db
        .insert(recheckRequests)
        .values({
          courseId: fx.courseId,
          submissionId: handIn.submissionId!,
          requestedBy: fx.student.id,
          message: 'Matrix request.',
        })
        .$returningId()
      return c.agent
        .post(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/recheck/${row!.id}/answer`)
        .set('x-csrf-token', c.csrf)
        .send({ answer: 'Matrix answer.' })
    },
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  // Starting next term's course from this one: a fresh code each call, so the instructor's succeeds.
  {
    route: 'POST /api/courses/:courseId/rollover/preview',
    call: (c, fx) =>
      c.agent
        .post(`${C(fx)}/rollover/preview`)
        .set('x-csrf-token', c.csrf)
        .send({ ...newCourse(), startDate: '2027-08-30', shiftWeeks: 27 }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/rollover',
    call: (c, fx) =>
      c.agent
        .post(`${C(fx)}/rollover`)
        .set('x-csrf-token', c.csrf)
        .send({ ...newCourse(), startDate: '2027-08-30', shiftWeeks: 27 }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 403, instructor: 201, admin: 404 },
  },
  // Runs at the stand, on bookings of the fixture's group G1 in section A (made by standBooking).
  {
    route: 'GET /api/courses/:courseId/bookings/:bookingId/run',
    call: async (c, fx) => c.agent.get(`${C(fx)}/bookings/${(await standRun(fx)).bookingId}/run`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/bookings/:bookingId/run',
    call: async (c, fx) => c.agent.post(`${C(fx)}/bookings/${await standBooking(fx)}/run`).set('x-csrf-token', c.csrf),
    expect: { anon: 401, outsider: 404, student: 403, ta: 201, instructor: 201, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/runs/:runId/entries',
    call: async (c, fx) =>
      c.agent
        .post(`${C(fx)}/runs/${(await standRun(fx)).runId}/entries`)
        .set('x-csrf-token', c.csrf)
        .send({ kind: 'note', text: 'Matrix note.' }),
    expect: { anon: 401, outsider: 404, student: 201, ta: 201, instructor: 201, admin: 404 },
  },
  {
    route: 'POST /api/courses/:courseId/runs/:runId/sign-off',
    call: async (c, fx) =>
      c.agent
        .post(`${C(fx)}/runs/${(await standRun(fx, true)).runId}/sign-off`)
        .set('x-csrf-token', c.csrf)
        .send({
          outcome: 'completed',
          startedAt: '2027-03-02T14:00:00Z',
          endedAt: '2027-03-02T14:20:00Z',
          people: [fx.student.id],
        }),
    expect: { anon: 401, outsider: 404, student: 403, ta: 200, instructor: 200, admin: 404 },
  },
  {
    route: 'GET /api/courses/:courseId/modules/:moduleId/signed-runs',
    call: (c, fx) => c.agent.get(`${M(fx)}/${pub()}/signed-runs`),
    expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
  },
  // Stands, slots, bookings and waiting lists
  ...standCases(() => ctx),
]

let standSeq = 0
/** A fresh active booking of group G1 on a stand slot of section A, inserted as the booking pages would. */
async function standBooking(fx: Fixture): Promise<number> {
  const db = ctx.handle.db
  standSeq += 1
  const [stand] = await db
    .insert(stands)
    .values({ courseId: fx.courseId, name: `Matrix stand ${standSeq}` })
    .$returningId()
  const [slot] = await db
    .insert(standSlots)
    .values({ standId: stand!.id, sectionId: fx.sectionA, startsAt: new Date('2027-03-02T14:00:00Z'), minutes: 30 })
    .$returningId()
  const [b] = await db
    .insert(bookings)
    .values({ slotId: slot!.id, labGroupId: await groupG1(fx), moduleId: pub() })
    .$returningId()
  return b!.id
}

/** An open run (checklist without hold points) on a booking of G1; a fresh one when `fresh` (for one sign-off each). */
let sharedRun: { bookingId: number; runId: number } | null = null
async function standRun(fx: Fixture, fresh = false): Promise<{ bookingId: number; runId: number }> {
  if (sharedRun && !fresh) return sharedRun
  const bookingId = await standBooking(fx)
  const [r] = await ctx.handle.db
    .insert(runRecords)
    .values({ courseId: fx.courseId, bookingId, moduleVersionId: mods.published!.versionId, checklist: [] })
    .$returningId()
  const made = { bookingId, runId: r!.id }
  if (!fresh) sharedRun = made
  return made
}

/** The revision the caller would have on screen (0 when they may not see it). */
async function revisionSeenBy(c: Client, fx: Fixture): Promise<number> {
  const r = await c.agent.get(`/api/courses/${fx.courseId}/submissions/${handIn.submissionId}/review`)
  return r.status === 200 ? (r.body.revision as number) : 0
}

let ctx: TestContext
let fx: Fixture

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const inst = await signedInAs(ctx, fx.instructor.email)
  mods.published = await createModuleAs(inst, fx.courseId, moduleSource('Published for the matrix'))
  await publishAs(inst, fx.courseId, mods.published)
  mods.toUnpublish = await createModuleAs(inst, fx.courseId, moduleSource('To unpublish'))
  await publishAs(inst, fx.courseId, mods.toUnpublish)
  // A cold-flow module with one hand-in by the fixture student.
  mods.coldFlow = await createModuleAs(
    inst,
    fx.courseId,
    currentDueDates(readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')),
  )
  await publishAs(inst, fx.courseId, mods.coldFlow)
  const st = await signedInAs(ctx, fx.student.email)
  // Thrust scaled up so the hand-in carries flags for the review rows.
  const log = coldFlowCsv({ thrustScale: 1.6 })
  const res = await st.agent
    .post(`${M(fx)}/${mods.coldFlow.id}/submissions`)
    .set('x-csrf-token', st.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
  if (res.status !== 201) throw new Error(`hand-in for the matrix failed: ${res.status} ${JSON.stringify(res.body)}`)
  handIn.submissionId = res.body.id
  handIn.fileId = res.body.files[0].id
  handIn.flagId = res.body.flags[0].id
  // A sheet with a photograph and one hand-in with it.
  mods.jet = await createModuleAs(inst, fx.courseId, JET_SHEET)
  await publishAs(inst, fx.courseId, mods.jet)
  const jet = await jetPhotoFile()
  const withPhoto = await st.agent
    .post(`${M(fx)}/${mods.jet.id}/submissions`)
    .set('x-csrf-token', st.csrf)
    .field('payload', JSON.stringify(jetPayload({ jet: jet.marks })))
    .attach('photo:jet', jet.bytes, 'jet.png')
  if (withPhoto.status !== 201)
    throw new Error(`photo hand-in failed: ${withPhoto.status} ${JSON.stringify(withPhoto.body)}`)
  handIn.photoSubmissionId = withPhoto.body.id
})
afterAll(async () => {
  await ctx.close()
})

async function clientFor(who: Who): Promise<Client> {
  if (who === 'anon') return anonymous(ctx)
  return signedInAs(ctx, fx[who].email)
}

describe('authorization matrix', () => {
  it('covers every API route the app registers', () => {
    const registered = listRoutes(ctx.created.app).filter((r) => r.includes(' /api/'))
    expect(registered).toEqual(CASES.map((c) => c.route).sort())
  })

  for (const c of CASES) {
    for (const who of Object.keys(c.expect) as Who[]) {
      it(`${c.route} as ${who} → ${c.expect[who]}`, async () => {
        const client = await clientFor(who)
        const res = await c.call(client, fx)
        expect(res.status).toBe(c.expect[who])
      })
    }
  }
})

describe('what each person can see', () => {
  it('a student sees only their own courses', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    const res = await c.agent.get('/api/courses').expect(200)
    expect(res.body.map((x: { id: number }) => x.id)).toEqual([fx.courseId])
  })

  it('a student cannot read a course they are not in, even by guessing its id', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    const res = await c.agent.get(`/api/courses/${fx.otherCourseId}`)
    expect(res.status).toBe(404)
    expect(res.body.error.code).toBe('not_found')
  })

  it('a student sees no section list or e-mail addresses on the course home', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    const res = await c.agent.get(`/api/courses/${fx.courseId}`).expect(200)
    expect(res.body.sections).toEqual([])
    expect(JSON.stringify(res.body)).not.toContain('@test.example')
  })

  it('staff see the sections with their TAs', async () => {
    const c = await signedInAs(ctx, fx.instructor.email)
    const res = await c.agent.get(`/api/courses/${fx.courseId}`).expect(200)
    expect(res.body.sections.map((s: { name: string }) => s.name)).toEqual(['A', 'B'])
    expect(res.body.sections[0].tas).toHaveLength(1)
    expect(res.body.counts).toEqual({ students: 2, tas: 1, instructors: 1 })
  })

  it('a site admin who creates a course becomes its instructor', async () => {
    const c = await signedInAs(ctx, fx.admin.email)
    const body = newCourse()
    const res = await c.agent.post('/api/courses').set('x-csrf-token', c.csrf).send(body).expect(201)
    expect(res.body).toMatchObject({ code: body.code, role: 'instructor' })
    const dup = await c.agent.post('/api/courses').set('x-csrf-token', c.csrf).send(body)
    expect(dup.status).toBe(409)
    expect(dup.body.error.code).toBe('course_exists')
  })

  it('a non-numeric course id is a 400 that names the parameter', async () => {
    const c = await signedInAs(ctx, fx.student.email)
    const res = await c.agent.get('/api/courses/abc')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain('courseId')
  })
})

describe('hand-in routes for both kinds of module', () => {
  // A lab-group partner of the fixture student (same group G1, section A).
  let partner: Client
  let submitter: Client
  const made: Record<'group' | 'individual', { submissionId: number; fileId: number }> = {} as never

  beforeAll(async () => {
    const tag = uniq()
    const { hashPassword } = await import('../../server/auth/password')
    const email = `partner.${tag}@test.example`
    const [u] = await ctx.handle.db
      .insert(users)
      .values({ email, displayName: `Partner ${tag}`, passwordHash: await hashPassword('partner-password-1') })
      .$returningId()
    await ctx.handle.db.insert(enrollments).values({
      userId: u!.id,
      courseId: fx.courseId,
      role: 'student',
      sectionId: fx.sectionA,
      labGroupId: await groupG1(fx),
    })
    partner = await signedInAs(ctx, email, 'partner-password-1')
    submitter = await signedInAs(ctx, fx.student.email)
    const inst = await signedInAs(ctx, fx.instructor.email)
    const cold = currentDueDates(
      readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
    )
    for (const kind of ['group', 'individual'] as const) {
      const source = cold
        .replace(/^groupSubmission: true$/m, `groupSubmission: ${kind === 'group'}`)
        .replace(/^title: .*$/m, `title: Cold flow, ${kind} hand-in`)
      const m = await createModuleAs(inst, fx.courseId, source)
      await publishAs(inst, fx.courseId, m)
      const log = coldFlowCsv()
      const res = await submitter.agent
        .post(`${M(fx)}/${m.id}/submissions`)
        .set('x-csrf-token', submitter.csrf)
        .field('payload', JSON.stringify(coldFlowPayload(log)))
        .attach('table:run', Buffer.from(log.csv), 'run.csv')
      if (res.status !== 201) throw new Error(`${kind} hand-in failed: ${res.status} ${JSON.stringify(res.body)}`)
      made[kind] = { submissionId: res.body.id, fileId: res.body.files[0].id }
    }
  })

  const routes: [string, (k: 'group' | 'individual') => string][] = [
    [
      'GET /api/courses/:courseId/submissions/:submissionId',
      (k) => `/api/courses/${fx.courseId}/submissions/${made[k].submissionId}`,
    ],
    [
      'GET /api/courses/:courseId/submissions/:submissionId/files/:fileId',
      (k) => `/api/courses/${fx.courseId}/submissions/${made[k].submissionId}/files/${made[k].fileId}`,
    ],
    [
      'GET /api/courses/:courseId/submissions/:submissionId/report.pdf',
      (k) => `/api/courses/${fx.courseId}/submissions/${made[k].submissionId}/report.pdf`,
    ],
  ]
  const expected = { group: { submitter: 200, partner: 200 }, individual: { submitter: 200, partner: 404 } } as const

  for (const [route, url] of routes) {
    for (const kind of ['group', 'individual'] as const) {
      for (const who of ['submitter', 'partner'] as const) {
        it(`${route} on a ${kind} module as the ${who} → ${expected[kind][who]}`, async () => {
          const c = who === 'submitter' ? submitter : partner
          const res = await c.agent.get(url(kind))
          expect(res.status).toBe(expected[kind][who])
        })
      }
    }
  }

  it('on an individual module a partner’s own attempts list does not include the submitter’s hand-in', async () => {
    const d = await partner.agent.get(`/api/courses/${fx.courseId}/submissions/${made.individual.submissionId}`)
    expect(d.status).toBe(404)
  })
})
