import { eq, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mailOutbox, moduleVersions } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'

let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let ta: Client
const M = () => `/api/courses/${fx.courseId}/modules`

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  ta = await signedInAs(ctx, fx.ta.email)
})
afterAll(async () => {
  await ctx.close()
})

describe('drafts and publishing', () => {
  it('a new module is a draft that students can neither list nor open', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Hidden draft'))
    const list = await student.agent.get(M()).expect(200)
    expect(list.body.map((x: { id: number }) => x.id)).not.toContain(m.id)
    await student.agent.get(`${M()}/${m.id}`).expect(404)
    const staffList = await ta.agent.get(M()).expect(200)
    expect(staffList.body.find((x: { id: number }) => x.id === m.id)).toMatchObject({
      status: 'draft',
      title: 'Hidden draft',
    })
  })

  it('publishing freezes the version, shows it to students with the due date in UTC, and queues one e-mail per student in the course', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Nozzle flow for publishing'))
    const res = await inst.agent
      .post(`${M()}/${m.id}/publish`)
      .set('x-csrf-token', inst.csrf)
      .send({ versionId: m.versionId })
    expect(res.status).toBe(200)
    expect(res.body.emailed).toBe(2)
    const read = await student.agent.get(`${M()}/${m.id}`).expect(200)
    expect(read.body.title).toBe('Nozzle flow for publishing')
    // 17:00 in Denver in February is 00:00 UTC the next day (MST, UTC−7).
    expect(read.body.dueAt).toBe('2027-02-10T00:00:00.000Z')
    expect(read.body.html).toContain('class="katex"')
    const mail = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `module-published:${m.versionId}`))
    expect(mail.map((r) => r.toAddress).sort()).toEqual([fx.student.email, fx.student2.email].sort())
    expect(mail[0]!.subject).toContain('Nozzle flow for publishing')
    // The e-mail states the due date in the course's zone (UTC for this test course).
    expect(mail[0]!.textBody).toMatch(/Due: Wed, Feb 10, 2027, 00:00 UTC/)
    expect(mail[0]!.textBody).toContain(`/c/${fx.courseSlug}/sheets/${m.slug}`)
    expect(mail[0]!.textBody).toContain('issued to the class')
  })

  it('editing a published module starts a new draft version; students keep reading the published one', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Versioned module'))
    await publishAs(inst, fx.courseId, m)
    const save = await inst.agent
      .put(`${M()}/${m.id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ source: moduleSource('Versioned module', 'A second paragraph, edited.'), baseVersionId: m.versionId })
    expect(save.status).toBe(200)
    expect(save.body.current.number).toBe(2)
    expect(save.body.current.status).toBe('draft')
    expect(save.body.published.number).toBe(1)
    const read = await student.agent.get(`${M()}/${m.id}`).expect(200)
    expect(read.body.version.number).toBe(1)
    expect(read.body.html).not.toContain('edited')

    const versions = await ta.agent.get(`${M()}/${m.id}/versions`).expect(200)
    expect(versions.body.map((v: { number: number; status: string }) => [v.number, v.status])).toEqual([
      [2, 'draft'],
      [1, 'published'],
    ])
    expect(versions.body[1].publishedBy).toContain('instructor')
    const diff = await ta.agent
      .get(`${M()}/${m.id}/diff?from=${versions.body[1].id}&to=${versions.body[0].id}`)
      .expect(200)
    expect(diff.body.added).toBeGreaterThan(0)
    const lines = diff.body.hunks.flatMap((h: { lines: { kind: string; text: string }[] }) => h.lines)
    expect(lines).toContainEqual({ kind: 'add', text: 'A second paragraph, edited.' })
  })

  it('a save from a stale copy is refused with a conflict instead of overwriting', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Conflict module'))
    await publishAs(inst, fx.courseId, m)
    await inst.agent
      .put(`${M()}/${m.id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ source: moduleSource('Conflict module', 'first'), baseVersionId: m.versionId })
      .expect(200)
    const stale = await inst.agent
      .put(`${M()}/${m.id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ source: moduleSource('Conflict module', 'second'), baseVersionId: m.versionId })
    expect(stale.status).toBe(409)
    expect(stale.body.error.code).toBe('edit_conflict')
    const ed = await inst.agent.get(`${M()}/${m.id}/edit`).expect(200)
    expect(ed.body.current.source).toContain('first')
  })

  it('unpublishing hides the module from students again', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Unpublish me'))
    await publishAs(inst, fx.courseId, m)
    await student.agent.get(`${M()}/${m.id}`).expect(200)
    await inst.agent.post(`${M()}/${m.id}/unpublish`).set('x-csrf-token', inst.csrf).expect(200)
    await student.agent.get(`${M()}/${m.id}`).expect(404)
  })

  it('exports the current source as a Markdown file', async () => {
    const src = moduleSource('Export me')
    const m = await createModuleAs(inst, fx.courseId, src)
    const res = await ta.agent.get(`${M()}/${m.id}/export`).expect(200)
    expect(res.headers['content-type']).toMatch(/text\/markdown/)
    expect(res.headers['content-disposition']).toMatch(/^attachment; filename="?export-me-v1\.md"?$/)
    expect(res.text).toBe(src)
  })
})

describe('bad module input', () => {
  it('front matter that is not YAML can be saved as a draft but not published, and the problem is named', async () => {
    const bad = '---\ntitle: [unclosed\n---\n\n# Body\n'
    const res = await inst.agent.post(M()).set('x-csrf-token', inst.csrf).send({ source: bad })
    expect(res.status).toBe(201)
    expect(res.body.current.valid).toBe(false)
    expect(res.body.current.issues.length).toBeGreaterThan(0)
    const pub = await inst.agent
      .post(`${M()}/${res.body.id}/publish`)
      .set('x-csrf-token', inst.csrf)
      .send({ versionId: res.body.current.id })
    expect(pub.status).toBe(422)
    expect(pub.body.error.code).toBe('module_invalid')
    expect(pub.body.error.details.issues.length).toBeGreaterThan(0)
  })

  it('a module without a title is refused at publish with the field named', async () => {
    const res = await inst.agent
      .post(M())
      .set('x-csrf-token', inst.csrf)
      .send({ source: '---\nsummary: no title here\n---\n\nText\n' })
    expect(res.status).toBe(201)
    expect(res.body.current.issues.map((i: { path: string }) => i.path).join(' ')).toContain('title')
  })

  it('a module over 1 MB is refused and the stored module is unchanged', async () => {
    const m = await createModuleAs(inst, fx.courseId, moduleSource('Size limit'))
    const huge = moduleSource('Size limit', 'x'.repeat(1_100_000))
    const res = await inst.agent
      .put(`${M()}/${m.id}`)
      .set('x-csrf-token', inst.csrf)
      .send({ source: huge, baseVersionId: m.versionId })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(/1 MB/)
    const ed = await inst.agent.get(`${M()}/${m.id}/edit`).expect(200)
    expect(ed.body.current.source).toBe(moduleSource('Size limit'))
  })

  it('script tags and javascript: links in the Markdown never reach the stored HTML', async () => {
    const body = '<script>alert(1)</script>\n\n<img src=x onerror=alert(1)>\n\n[click](javascript:alert(1))\n'
    const m = await createModuleAs(inst, fx.courseId, moduleSource('XSS attempt', body))
    const rows = await ctx.handle.db.select().from(moduleVersions).where(eq(moduleVersions.id, m.versionId))
    const html = rows[0]!.html
    expect(html).not.toMatch(/<script/i)
    expect(html).not.toMatch(/<img[^>]*onerror/i)
    expect(html).not.toMatch(/href="javascript:/i)
  })

  it('publishing an unknown module or another course’s module is a 404', async () => {
    await inst.agent.post(`${M()}/999999999/publish`).set('x-csrf-token', inst.csrf).send({ versionId: 1 }).expect(404)
    const others = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(like(mailOutbox.dedupeKey, 'module-published:999999999%'))
    expect(others).toHaveLength(0)
  })
})
