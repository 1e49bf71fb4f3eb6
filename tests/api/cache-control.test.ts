import { readFileSync } from 'node:fs'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'

/**
 * Every API reply is about one person, so none may be kept by a browser or a shared cache: each
 * carries `Cache-Control: no-store` — JSON, errors, CSV, downloaded files — unless its route sets
 * a policy of its own on purpose (the feedback reports: private, no-store).
 */

const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)

let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let moduleId: number
let submissionId: number
let fileId: number

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  const mod = await createModuleAs(inst, fx.courseId, COLD)
  await publishAs(inst, fx.courseId, mod)
  moduleId = mod.id
  const log = coldFlowCsv()
  const res = await student.agent
    .post(`/api/courses/${fx.courseId}/modules/${moduleId}/submissions`)
    .set('x-csrf-token', student.csrf)
    .field('payload', JSON.stringify(coldFlowPayload(log)))
    .attach('table:run', Buffer.from(log.csv), 'run.csv')
  if (res.status !== 201) throw new Error(`hand-in failed: ${res.status} ${JSON.stringify(res.body)}`)
  submissionId = res.body.id
  fileId = res.body.files[0].id
})
afterAll(async () => {
  await ctx.close()
})

describe('Cache-Control on API replies', () => {
  it('JSON replies, signed in or not', async () => {
    const anon = await anonymous(ctx)
    const replies = [
      ['session', await anon.agent.get('/api/auth/session')],
      ['health', await anon.agent.get('/api/health')],
      ['course', await inst.agent.get(`/api/courses/${fx.courseId}`)],
      ['module editing', await inst.agent.get(`/api/courses/${fx.courseId}/modules/${moduleId}/edit`)],
      ['hand-in', await student.agent.get(`/api/courses/${fx.courseId}/submissions/${submissionId}`)],
    ] as const
    for (const [what, res] of replies) {
      expect(res.status, what).toBe(200)
      expect(res.headers['cache-control'], what).toBe('no-store')
    }
  })

  it('error replies: not signed in, not found, bad input, an unknown API route', async () => {
    const anon = await anonymous(ctx)
    const replies = [
      ['not signed in', await anon.agent.get('/api/courses'), 401],
      ['not found', await inst.agent.get(`/api/courses/${fx.otherCourseId}`), 404],
      [
        'bad input',
        await inst.agent.post(`/api/courses/${fx.courseId}/sections`).set('x-csrf-token', inst.csrf).send({ name: '' }),
        400,
      ],
      ['unknown route', await inst.agent.get('/api/no-such-route'), 404],
    ] as const
    for (const [what, res, status] of replies) {
      expect(res.status, what).toBe(status)
      expect(res.headers['cache-control'], what).toBe('no-store')
    }
  })

  it('CSV, Markdown and raw-upload downloads', async () => {
    const csv = await inst.agent.get(`/api/courses/${fx.courseId}/gradebook.csv`)
    expect(csv.status).toBe(200)
    expect(csv.headers['content-type']).toMatch(/text\/csv/)
    expect(csv.headers['cache-control']).toBe('no-store')
    const md = await inst.agent.get(`/api/courses/${fx.courseId}/modules/${moduleId}/export`)
    expect(md.status).toBe(200)
    expect(md.headers['cache-control']).toBe('no-store')
    const file = await student.agent.get(`/api/courses/${fx.courseId}/submissions/${submissionId}/files/${fileId}`)
    expect(file.status).toBe(200)
    expect(file.headers['content-disposition']).toMatch(/attachment/)
    expect(file.headers['cache-control']).toBe('no-store')
  })

  it('a route that sets its own policy keeps it (the feedback report PDF)', async () => {
    const pdf = await student.agent.get(`/api/courses/${fx.courseId}/submissions/${submissionId}/report.pdf`)
    expect(pdf.status).toBe(200)
    expect(pdf.headers['cache-control']).toBe('private, no-store')
  })
})
