/**
 * Photographs in a hand-in (a sheet's `assignment.images`): the picture is checked from its bytes
 * and stored re-encoded in the hand-in's transaction, the marks are checked against the picture and
 * the sheet's rules, and the measured distances are graded like any other result.
 */
import { eq } from 'drizzle-orm'
import sharp from 'sharp'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { submissionImages, submissions } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { JET_SHEET, jetPayload, jetPhotoFile } from '../helpers/jet-photo'
import { createModuleAs, publishAs, type CreatedModule } from '../helpers/modules'

let ctx: TestContext
let fx: Fixture
let inst: Client
let student: Client
let student2: Client
let ta: Client
let mod: CreatedModule
let good: Awaited<ReturnType<typeof jetPhotoFile>>

function handIn(c: Client, files: { field: string; name: string; body: Buffer }[], images: Record<string, unknown>) {
  let req = c.agent
    .post(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions`)
    .set('x-csrf-token', c.csrf)
    .field('payload', JSON.stringify(jetPayload(images)))
  for (const f of files) req = req.attach(f.field, f.body, f.name)
  return req
}

async function counts() {
  const db = ctx.handle.db
  const subs = await db.select({ id: submissions.id }).from(submissions).where(eq(submissions.moduleId, mod.id))
  const imgs = await db.select({ id: submissionImages.id }).from(submissionImages)
  return { subs: subs.length, imgs: imgs.length }
}

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
  student = await signedInAs(ctx, fx.student.email)
  student2 = await signedInAs(ctx, fx.student2.email)
  ta = await signedInAs(ctx, fx.ta.email)
  mod = await createModuleAs(inst, fx.courseId, JET_SHEET)
  await publishAs(inst, fx.courseId, mod)
  good = await jetPhotoFile('png')
})
afterAll(async () => {
  await ctx.close()
})

describe('handing in a photograph with marks', () => {
  it('stores the picture re-encoded with the hand-in, grades the measured distances, and serves it to those who may see it', async () => {
    const res = await handIn(student, [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }], {
      jet: good.marks,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const d = res.body
    expect(d.images).toHaveLength(1)
    expect(d.images[0]).toMatchObject({ key: 'jet', contentType: 'image/png', width: 480, height: 200 })
    expect(d.images[0].marks).toEqual(good.marks)
    expect(d.images[0].originalSha256).toMatch(/^[0-9a-f]{64}$/)
    // The rendered cells are 12 mm apart: the marks measure that, and the check of the reported
    // mean spacing (measured here with the same marks) passes.
    expect(d.status, JSON.stringify(d)).toBe('graded')
    const byKey = Object.fromEntries(d.checks.map((c: { key: string }) => [c.key, c]))
    expect(byKey.spacing_measured.outcome).toBe('pass')
    expect(byKey.spacing_measured.expected).toBeCloseTo(12, 0)
    expect(byKey.cells_marked.expected).toBe(good.marks.cellEnds.length)

    const url = `/api/courses/${fx.courseId}/submissions/${d.id}/images/jet`
    const own = await student.agent.get(url).buffer(true)
    expect(own.status).toBe(200)
    expect(own.headers['content-type']).toBe('image/png')
    expect(own.headers['x-content-type-options']).toBe('nosniff')
    const meta = await sharp(own.body as Buffer).metadata()
    expect([meta.width, meta.height]).toEqual([480, 200])
    expect((await ta.agent.get(url)).status).toBe(200)
    expect((await inst.agent.get(url)).status).toBe(200)
    // Another student (other section, no group) and a photograph the hand-in does not have: 404.
    expect((await student2.agent.get(url)).status).toBe(404)
    expect((await student.agent.get(url.replace(/jet$/, 'other'))).status).toBe(404)

    // The TA's view of the hand-in carries the marks as stored.
    const seen = await ta.agent.get(`/api/courses/${fx.courseId}/submissions/${d.id}`)
    expect(seen.body.images[0].marks).toEqual(good.marks)
  })

  it('keeps no camera metadata: a JPEG with EXIF comes back without it', async () => {
    const jpeg = await jetPhotoFile('jpeg')
    const withExif = await sharp(jpeg.bytes)
      .withExif({ IFD0: { Make: 'Bench camera', Model: 'Serial 0042' } })
      .jpeg()
      .toBuffer()
    expect((await sharp(withExif).metadata()).exif).toBeDefined()
    const res = await handIn(student, [{ field: 'photo:jet', name: 'jet.jpg', body: withExif }], {
      jet: jpeg.marks,
    })
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    const got = await student.agent
      .get(`/api/courses/${fx.courseId}/submissions/${res.body.id}/images/jet`)
      .buffer(true)
    expect(got.headers['content-type']).toBe('image/jpeg')
    const meta = await sharp(got.body as Buffer).metadata()
    expect(meta.exif).toBeUndefined()
    expect((got.body as Buffer).includes(Buffer.from('Serial 0042'))).toBe(false)
  })
})

describe('copies', () => {
  it('flags a photograph that is byte for byte the same file as another student’s', async () => {
    const copy = await jetPhotoFile('png', { width: 400, height: 180 })
    const first = await handIn(student, [{ field: 'photo:jet', name: 'mine.png', body: copy.bytes }], {
      jet: copy.marks,
    })
    expect(first.status).toBe(201)
    expect(first.body.flags.map((f: { code: string }) => f.code)).not.toContain('identical-file')
    const second = await handIn(student2, [{ field: 'photo:jet', name: 'also-mine.png', body: copy.bytes }], {
      jet: copy.marks,
    })
    expect(second.status).toBe(201)
    const flag = second.body.flags.find((f: { code: string }) => f.code === 'identical-file')
    expect(flag?.message).toMatch(/photograph "Shadowgraph of the jet" is byte-for-byte the same file/)
  })
})

describe('a photograph or marks that cannot be taken store nothing', () => {
  const cases: { name: string; status: number; field: RegExp; build: () => Promise<Parameters<typeof handIn>> }[] = [
    {
      name: 'an SVG named .png',
      status: 400,
      field: /^photo:jet$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: Buffer.from('<svg xmlns="http://www.w3.org/2000/svg"/>') }],
        { jet: good.marks },
      ],
    },
    {
      name: 'a cut-short PNG',
      status: 400,
      field: /^photo:jet$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: good.bytes.subarray(0, Math.floor(good.bytes.length / 2)) }],
        { jet: good.marks },
      ],
    },
    {
      name: 'no photograph at all',
      status: 422,
      field: /^photo:jet$/,
      build: async () => [student, [], { jet: good.marks }],
    },
    {
      name: 'a photograph without marks',
      status: 422,
      field: /^images\.jet$/,
      build: async () => [student, [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }], {}],
    },
    {
      name: 'a cell end outside the picture',
      status: 422,
      field: /^images\.jet\.cell-end\.2$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }],
        {
          jet: {
            ...good.marks,
            cellEnds: good.marks.cellEnds.map((p, i) => (i === 1 ? { x: 900, y: p.y } : p)),
          },
        },
      ],
    },
    {
      name: 'a scale of zero length',
      status: 422,
      field: /^images\.jet\.scale$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }],
        { jet: { ...good.marks, scale: { ...good.marks.scale, to: good.marks.scale.from } } },
      ],
    },
    {
      name: 'too few cell ends',
      status: 422,
      field: /^images\.jet\.cell-end$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }],
        { jet: { ...good.marks, cellEnds: good.marks.cellEnds.slice(0, 1) } },
      ],
    },
    {
      name: 'too many cell ends',
      status: 422,
      field: /^images\.jet\.cell-end$/,
      build: async () => [
        student,
        [{ field: 'photo:jet', name: 'jet.png', body: good.bytes }],
        {
          jet: {
            ...good.marks,
            cellEnds: Array.from({ length: 7 }, (_, i) => ({ x: 100 + i * 20, y: 100 })),
          },
        },
      ],
    },
  ]
  for (const c of cases) {
    it(c.name, async () => {
      const before = await counts()
      const res = await handIn(...(await c.build()))
      expect(res.status, JSON.stringify(res.body)).toBe(c.status)
      const fields: string[] =
        res.body.error.code === 'photo_refused'
          ? [res.body.error.details.field]
          : res.body.error.details.issues.map((i: { field: string }) => i.field)
      expect(
        fields.some((f) => c.field.test(f)),
        JSON.stringify(res.body),
      ).toBe(true)
      expect(res.body.error.message).toMatch(/Shadowgraph of the jet/)
      expect(await counts()).toEqual(before)
    })
  }

  it('refuses a PNG bomb by its header, before decoding it', async () => {
    // 10 000 × 5 000 pixels of black: a small file that would unpack to 50 megapixels.
    const bomb = await sharp({ create: { width: 10_000, height: 5_000, channels: 3, background: '#000' } })
      .png({ compressionLevel: 9 })
      .toBuffer()
    expect(bomb.length).toBeLessThan(2 * 1024 * 1024)
    const before = await counts()
    const res = await handIn(student, [{ field: 'photo:jet', name: 'jet.png', body: bomb }], { jet: good.marks })
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('photo_refused')
    expect(res.body.error.message).toMatch(/10000 × 5000|megapixels/)
    expect(await counts()).toEqual(before)
  })
})
