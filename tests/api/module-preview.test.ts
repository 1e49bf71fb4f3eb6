import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource } from '../helpers/modules'

/**
 * The editor's live preview (POST …/modules/:id/preview): the server checks and renders unsaved
 * text with the same function a save uses, answers title, HTML, due date and problems, and
 * stores nothing.
 */

let ctx: TestContext
let fx: Fixture
let inst: Client
let ta: Client
let mod: CreatedModule
const url = () => `/api/courses/${fx.courseId}/modules/${mod.id}/preview`

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  ta = await signedInAs(ctx, fx.ta.email)
  mod = await createModuleAs(inst, fx.courseId, moduleSource('Saved title'))
})
afterAll(async () => {
  await ctx.close()
})

describe('module preview', () => {
  it('renders the unsaved text as a save would, and stores nothing', async () => {
    const source = moduleSource('Unsaved title', 'Pressure ratio $p/p_0$ and **bold**.')
    const res = await inst.agent.post(url()).set('x-csrf-token', inst.csrf).send({ source })
    expect(res.status).toBe(200)
    expect(res.body.title).toBe('Unsaved title')
    expect(res.body.issues).toEqual([])
    // Blocks carry their source lines (1-based in the whole text) for the editor to follow the cursor.
    const headingLine = source.split('\n').findIndex((l) => /^#+ Unsaved title/.test(l)) + 1
    expect(headingLine).toBeGreaterThan(1)
    expect(res.body.html).toContain(`<h2 data-source-line="${headingLine}">Unsaved title</h2>`)
    expect(res.body.html).toContain('<strong>bold</strong>')
    expect(res.body.html).toContain('class="katex"')
    // 2027-02-09 17:00 in Denver (UTC−7).
    expect(res.body.dueAt).toBe('2027-02-10T00:00:00.000Z')

    const saved = await inst.agent.get(`/api/courses/${fx.courseId}/modules/${mod.id}/edit`)
    expect(saved.body.current.title).toBe('Saved title')
    expect(saved.body.current.source).toBe(moduleSource('Saved title'))
    expect(saved.body.current.id).toBe(mod.versionId)
  })

  it('lists the problems a save would list, with their lines', async () => {
    const source = moduleSource('Broken', 'A formula $\\frac{1}{$ that does not close.')
    const res = await ta.agent.post(url()).set('x-csrf-token', ta.csrf).send({ source })
    expect(res.status).toBe(200)
    expect(res.body.issues).toHaveLength(1)
    expect(res.body.issues[0].path).toBe('body')
    expect(res.body.issues[0].message).toContain('TeX error')
    expect(res.body.issues[0].line).toBe(11)
  })

  it('sanitises what it renders', async () => {
    const source = moduleSource('Links', '[x](javascript:alert(1)) <img src=x onerror=alert(1)>')
    const res = await inst.agent.post(url()).set('x-csrf-token', inst.csrf).send({ source })
    expect(res.status).toBe(200)
    // The link is refused and the raw HTML shown as text.
    expect(res.body.html).not.toMatch(/<img|<a\s/)
    expect(res.body.html).toContain('&lt;img src=x onerror=alert(1)&gt;')
  })

  it('refuses a request without text, naming the field', async () => {
    for (const body of [{}, { source: '' }, { source: 42 }]) {
      const res = await inst.agent.post(url()).set('x-csrf-token', inst.csrf).send(body)
      expect(res.status, JSON.stringify(body)).toBe(400)
      expect(JSON.stringify(res.body), JSON.stringify(body)).toContain('source')
    }
  })

  it('answers 404 for a module that is not in the course', async () => {
    const res = await inst.agent
      .post(`/api/courses/${fx.courseId}/modules/999999999/preview`)
      .set('x-csrf-token', inst.csrf)
      .send({ source: moduleSource('Nowhere') })
    expect(res.status).toBe(404)
  })
})
