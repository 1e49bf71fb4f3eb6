import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'

/** Page addresses: a course by the slug of its code and term, its lab sheets by their own slug. */
let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let outsider: Client

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  outsider = await signedInAs(ctx, fx.outsider.email)
})
afterAll(async () => {
  await ctx.close()
})

describe('course keys', () => {
  it('the slug is the code and term in lower case with runs of other characters as one hyphen', async () => {
    const home = await inst.agent.get(`/api/courses/${fx.courseId}`).expect(200)
    // The fixture course is "T<tag>" in "Test term".
    expect(home.body.course.slug).toBe(`${home.body.course.code.toLowerCase()}-test-term`)
    expect(fx.courseSlug).toBe(home.body.course.slug)
    const mine = await student.agent.get('/api/courses').expect(200)
    expect(mine.body.find((c: { id: number }) => c.id === fx.courseId).slug).toBe(fx.courseSlug)
  })

  it('maps the slug to the id and lists the sheets each person may open by their slugs', async () => {
    const issued = await createModuleAs(inst, fx.courseId, moduleSource(`Issued sheet ${uniq()}`))
    await publishAs(inst, fx.courseId, issued)
    const preparing = await createModuleAs(inst, fx.courseId, moduleSource(`Sheet in preparation ${uniq()}`))

    const staff = await inst.agent.get(`/api/course-keys/${fx.courseSlug}`).expect(200)
    expect(staff.body.courseId).toBe(fx.courseId)
    expect(staff.body.slug).toBe(fx.courseSlug)
    expect(staff.body.sheets).toEqual(
      expect.arrayContaining([
        { id: issued.id, slug: issued.slug },
        { id: preparing.id, slug: preparing.slug },
      ]),
    )
    // A student gets the issued sheet only, as on the course home.
    const mine = await student.agent.get(`/api/course-keys/${fx.courseSlug}`).expect(200)
    expect(mine.body.sheets).toContainEqual({ id: issued.id, slug: issued.slug })
    expect(mine.body.sheets.map((s: { id: number }) => s.id)).not.toContain(preparing.id)
    // Old numeric addresses find the same keys.
    const byId = await student.agent.get(`/api/course-keys/by-id/${fx.courseId}`).expect(200)
    expect(byId.body).toEqual(mine.body)
  })

  it('a course you are not in, or no course at all, is not found; a malformed slug names the field', async () => {
    expect((await outsider.agent.get(`/api/course-keys/${fx.courseSlug}`)).status).toBe(404)
    expect((await outsider.agent.get(`/api/course-keys/by-id/${fx.courseId}`)).status).toBe(404)
    expect((await student.agent.get(`/api/course-keys/no-such-course-${uniq().toLowerCase()}`)).status).toBe(404)
    const bad = await student.agent.get('/api/course-keys/Not%20A%20Slug')
    expect(bad.status).toBe(400)
    expect(JSON.stringify(bad.body)).toContain('courseSlug')
  })

  it('a second course whose code and term differ only in case and punctuation is refused, naming code and term', async () => {
    const admin = await signedInAs(ctx, fx.admin.email)
    const code = `K${uniq()}`
    const course = { title: 'Key clash', institution: 'Test University (fictional)', timeZone: 'UTC' }
    await admin.agent
      .post('/api/courses')
      .set('x-csrf-token', admin.csrf)
      .send({ ...course, code: `${code} 1`, term: 'Spring 2031' })
      .expect(201)
    const clash = await admin.agent
      .post('/api/courses')
      .set('x-csrf-token', admin.csrf)
      .send({ ...course, code: `${code.toLowerCase()}-1`, term: 'spring  2031' })
    expect(clash.status).toBe(409)
    expect(clash.body.error.code).toBe('course_exists')
    expect(clash.body.error.details).toEqual({ fields: ['code', 'term'] })
  })
})
