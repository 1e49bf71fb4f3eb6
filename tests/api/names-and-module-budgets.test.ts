import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { courses, labGroups, modules, sections } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import { createModuleAs } from '../helpers/modules'

/**
 * Through the API: titles and names with control characters are refused with the field named and
 * nothing stored; a module over a size budget is saved as a draft with the problem named, and
 * cannot be published.
 */

let ctx: TestContext
let fx: Fixture
let admin: Client
let inst: Client

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  admin = await signedInAs(ctx, fx.admin.email)
  inst = await signedInAs(ctx, fx.instructor.email)
})
afterAll(async () => {
  await ctx.close()
})

const send = (c: Client, method: 'post' | 'patch', url: string, body: object) =>
  c.agent[method](url).set('x-csrf-token', c.csrf).send(body)

describe('control characters in titles and names', () => {
  it('a course title with a line break is a 400 naming the title, and no course is made', async () => {
    const code = `CC${uniq().slice(0, 6)}`
    const res = await send(admin, 'post', '/api/courses', {
      code,
      title: 'Propulsion lab\r\nBcc: all@example.com',
      term: 'Spring',
      institution: 'Test University',
      timeZone: 'UTC',
    })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toMatch(
      /^title: The course title must be one line of plain text, but it contains a line break/,
    )
    expect(await ctx.handle.db.select().from(courses).where(eq(courses.code, code))).toEqual([])
    const ok = await send(admin, 'post', '/api/courses', {
      code,
      title: 'Laboratoire de propulsion – été',
      term: 'Été',
      institution: 'Université d’essai',
      timeZone: 'UTC',
    })
    expect(ok.status).toBe(201)
  })

  it('section and lab-group names with control characters are refused and nothing changes', async () => {
    const before = await ctx.handle.db
      .select({ id: sections.id, name: sections.name })
      .from(sections)
      .where(eq(sections.courseId, fx.courseId))
    const created = await send(inst, 'post', `/api/courses/${fx.courseId}/sections`, { name: 'C\n02' })
    expect(created.status).toBe(400)
    expect(created.body.error.message).toContain('The section name must be one line of plain text')
    const renamed = await send(inst, 'patch', `/api/courses/${fx.courseId}/sections/${fx.sectionA}`, {
      name: 'A\u001b[31m',
    })
    expect(renamed.status).toBe(400)
    expect(
      await ctx.handle.db
        .select({ id: sections.id, name: sections.name })
        .from(sections)
        .where(eq(sections.courseId, fx.courseId)),
    ).toEqual(before)
    const group = await send(inst, 'post', `/api/courses/${fx.courseId}/lab-groups`, { name: 'G\u202e7' })
    expect(group.status).toBe(400)
    expect(group.body.error.message).toContain('The lab-group name')
    expect(
      (await ctx.handle.db.select().from(labGroups).where(eq(labGroups.courseId, fx.courseId))).map((g) => g.name),
    ).toEqual(['G1'])
  })

  it('a roster import names the row and column of a display name with a control character', async () => {
    const t = uniq()
    const csv = `email,name\nok.${t}@import.example,Eluned Marrowby\nbad.${t}@import.example,Bell\u0007 Ringer\n`
    const res = await send(inst, 'post', `/api/courses/${fx.courseId}/roster/import/preview`, { csv })
    expect(res.status).toBe(200)
    const bad = res.body.rows.find((r: { row: number }) => r.row === 3)
    expect(bad.kind).toBe('invalid')
    expect(bad.problems).toEqual([{ column: 'name', message: expect.stringContaining('U+0007') }])
    expect(res.body.ok).toBe(false)
  })

  it('a module title with a line break is named as a problem and the module cannot be published', async () => {
    const source = ['---', 'title: "Nozzle\\u0085flow"', '---', '# Body'].join('\n')
    const res = await send(inst, 'post', `/api/courses/${fx.courseId}/modules`, { source })
    expect(res.status).toBe(201)
    expect(res.body.current.issues.map((i: { path: string }) => i.path)).toEqual(['title'])
    expect(res.body.current.issues[0].message).toContain('control character U+0085')
    // The draft is listed under a clean title, not the one refused.
    expect(res.body.current.title).not.toContain('\u0085')
    const pub = await send(inst, 'post', `/api/courses/${fx.courseId}/modules/${res.body.id}/publish`, {
      versionId: res.body.current.id,
    })
    expect(pub.status).toBe(422)
    expect(pub.body.error.code).toBe('module_invalid')
  })
})

describe('module size budgets at save time', () => {
  const head = [
    '---',
    'title: Budgets',
    'assignment:',
    '  tables:',
    '    - key: run',
    '      label: Run',
    '      minRows: 2000',
    '      columns:',
    '        - { key: t, label: Time, unit: s, role: time }',
    '        - { key: thrust, label: Thrust, unit: N }',
    '  results:',
  ]
  const result = (key: string, expected: string) => [
    `    - key: ${key}`,
    '      label: A result',
    '      unit: N',
    `      expected: "${expected}"`,
    '      tolerance: { relative: 0.05 }',
    '      points: 1',
  ]
  const matrix = `[${Array.from({ length: 200 }, (_, i) => `[${i + 1}]`).join(', ')}]`

  it('100 results over a 2000-row table are named as one problem (the limit and the first result over it)', async () => {
    const lines = [...head]
    for (let i = 1; i <= 100; i++) lines.push(...result(`r${i}`, `sum(${matrix} * [thrust])`))
    const res = await send(inst, 'post', `/api/courses/${fx.courseId}/modules`, {
      source: [...lines, '---', '# Body'].join('\n'),
    })
    expect(res.status).toBe(201)
    expect(res.body.current.issues).toHaveLength(1)
    expect(res.body.current.issues[0].path).toBe('assignment.results')
    expect(res.body.current.issues[0].message).toContain(
      'at most 40 results; this one has 100; the first over the limit is "r41"',
    )
  })

  it('a 200-row matrix in an expression is named with its result and the limit, and the module cannot be published', async () => {
    const lines = [...head, ...result('blowup', `sum(${matrix} * [thrust])`), ...result('peak', 'max(thrust)')]
    const res = await send(inst, 'post', `/api/courses/${fx.courseId}/modules`, {
      source: [...lines, '---', '# Body'].join('\n'),
    })
    expect(res.status).toBe(201)
    expect(res.body.current.issues).toEqual([
      expect.objectContaining({
        path: 'assignment.results[0].expected',
        message: expect.stringContaining(
          'result "blowup": a list written out in the expression has 200 values; at most 64',
        ),
      }),
    ])
    const pub = await send(inst, 'post', `/api/courses/${fx.courseId}/modules/${res.body.id}/publish`, {
      versionId: res.body.current.id,
    })
    expect(pub.status).toBe(422)
    expect(pub.body.error.details.issues[0].message).toContain('at most 64')
    const [row] = await ctx.handle.db
      .select({ status: modules.status })
      .from(modules)
      .where(eq(modules.id, res.body.id))
    expect(row!.status).toBe('draft')
  })

  it('within the budgets the same module saves without problems', async () => {
    const small = `[${Array.from({ length: 64 }, (_, i) => `[${i + 1}]`).join(', ')}]`
    const m = await createModuleAs(
      inst,
      fx.courseId,
      [...head, ...result('weighted', `sum(${small} * [thrust])`), '---', '# Body'].join('\n'),
    )
    const res = await inst.agent.get(`/api/courses/${fx.courseId}/modules/${m.id}/edit`).expect(200)
    expect(res.body.current.issues).toEqual([])
  })
})
