import { once } from 'node:events'
import { readFileSync } from 'node:fs'
import http from 'node:http'
import type { AddressInfo } from 'node:net'
import { Readable } from 'node:stream'
import { eq } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { submissionFiles, submissions } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { PASSWORD, seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'
import { JET_SHEET, jetPayload, jetPhotoFile } from '../helpers/jet-photo'
import sharp from 'sharp'
import type { CreatedModule } from '../helpers/modules'

/**
 * The multipart layer of the hand-in route: the request's bytes are counted as they arrive, only
 * the files the module declares are taken, and a broken form is the sender's 400. The streaming
 * cases go through node:http against a listening app, so the body can be chunked and produced
 * lazily: what the client was asked to produce shows whether the server kept reading.
 */

const COLD = currentDueDates(
  readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8'),
)
const MB = 1024 * 1024
// The test app's limit per hand-in: 2 MB of files (plus room for the form's payload field).
const LIMIT_MB = 2

let ctx: TestContext
let fx: Fixture
let student: Client
let mod: CreatedModule
let server: http.Server
let base: string

beforeAll(async () => {
  ctx = startTestApp({ UPLOAD_LIMIT_MB: String(LIMIT_MB) })
  fx = await seedFixture(ctx)
  const inst = await signedInAs(ctx, fx.instructor.email)
  // Handed in by one student (student2 has no lab group), with attempts to spare.
  mod = await createModuleAs(
    inst,
    fx.courseId,
    COLD.replace('groupSubmission: true', 'groupSubmission: false').replace('attempts: 3', 'attempts: 50'),
  )
  await publishAs(inst, fx.courseId, mod)
  student = await signedInAs(ctx, fx.student2.email)
  server = ctx.created.app.listen(0, '127.0.0.1')
  await once(server, 'listening')
  base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`
})
afterAll(async () => {
  server.closeAllConnections()
  await new Promise((resolve) => server.close(resolve))
  await ctx.close()
})

const handInPath = () => `/api/courses/${fx.courseId}/modules/${mod.id}/submissions`
const stored = async () =>
  (await ctx.handle.db.select({ id: submissions.id }).from(submissions).where(eq(submissions.moduleId, mod.id))).length
const log = coldFlowCsv()

/** Signs in over real HTTP and returns the cookie header and CSRF token the browser would hold. */
async function httpSession(email: string): Promise<{ cookie: string; csrf: string }> {
  const jar = new Map<string, string>()
  const keep = (res: Response) => {
    for (const c of res.headers.getSetCookie()) {
      const pair = c.split(';')[0]!
      const eq = pair.indexOf('=')
      jar.set(pair.slice(0, eq), pair.slice(eq + 1))
    }
  }
  const cookie = () => [...jar].map(([k, v]) => `${k}=${v}`).join('; ')
  const session = await fetch(`${base}/api/auth/session`)
  keep(session)
  const { csrfToken } = (await session.json()) as { csrfToken: string }
  const signIn = await fetch(`${base}/api/auth/sign-in`, {
    method: 'POST',
    headers: { cookie: cookie(), 'x-csrf-token': csrfToken, 'content-type': 'application/json' },
    body: JSON.stringify({ email, password: PASSWORD }),
  })
  keep(signIn)
  if (signIn.status !== 200) throw new Error(`sign-in failed: ${signIn.status}`)
  return { cookie: cookie(), csrf: ((await signIn.json()) as { csrfToken: string }).csrfToken }
}

const BOUNDARY = 'handin-test-boundary'
const fieldPart = (name: string, value: string) =>
  Buffer.from(`--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"\r\n\r\n${value}\r\n`)
const fileHead = (name: string, filename: string) =>
  Buffer.from(
    `--${BOUNDARY}\r\nContent-Disposition: form-data; name="${name}"; filename="${filename}"\r\nContent-Type: text/csv\r\n\r\n`,
  )
const CLOSE = Buffer.from(`--${BOUNDARY}--\r\n`)

/** `bytes` of filler in 64 KB pieces (digits and commas, like a log). */
function* filler(bytes: number): Generator<Buffer> {
  const piece = Buffer.alloc(64 * 1024, '1,2,3\n')
  for (let left = bytes; left > 0; left -= piece.length) yield left >= piece.length ? piece : piece.subarray(0, left)
}

interface StreamedReply {
  status: number
  body: { error?: { code: string; message: string; details?: { field?: string } } }
  /** Bytes the client had produced when the answer came. */
  produced: number
  /** Bytes the whole body would have had. */
  total: number
}

/**
 * Sends a chunked multipart body (no Content-Length) produced lazily from `parts`, and stops
 * producing as soon as the server answers.
 */
function streamHandIn(
  session: { cookie: string; csrf: string },
  parts: () => Generator<Buffer>,
  total: number,
): Promise<StreamedReply> {
  return new Promise((resolve, reject) => {
    let produced = 0
    let answered = false
    const source = Readable.from(
      (function* () {
        for (const p of parts()) {
          produced += p.length
          yield p
        }
      })(),
    )
    const req = http.request(`${base}${handInPath()}`, {
      method: 'POST',
      headers: {
        cookie: session.cookie,
        'x-csrf-token': session.csrf,
        'content-type': `multipart/form-data; boundary=${BOUNDARY}`,
        'transfer-encoding': 'chunked',
      },
    })
    req.on('response', (res) => {
      answered = true
      const at = produced
      source.unpipe(req)
      source.destroy()
      const chunks: Buffer[] = []
      res.on('data', (c: Buffer) => chunks.push(c))
      res.on('end', () => {
        req.destroy()
        resolve({
          status: res.statusCode ?? 0,
          body: JSON.parse(Buffer.concat(chunks).toString('utf8')) as StreamedReply['body'],
          produced: at,
          total,
        })
      })
    })
    // Once the server has answered and closed, the client's unsent rest fails to write: expected.
    req.on('error', (error) => {
      if (!answered) reject(error)
    })
    source.pipe(req)
  })
}

describe('a chunked hand-in (no Content-Length) is measured as it streams', () => {
  it('is stopped with a 413 naming the limit once its bytes pass it, although no single part is over the file limit', async () => {
    const session = await httpSession(fx.student2.email)
    const before = await stored()
    // A valid payload, a declared file under the 2 MB file limit, then text fields of 1.9 MB each:
    // 200 MB in all if the server read everything.
    const piece = Math.round(1.9 * MB)
    const fields = 100
    const head = Buffer.concat([
      fieldPart('payload', JSON.stringify(coldFlowPayload(log))),
      fileHead('table:run', 'run.csv'),
    ])
    const fieldHead = (i: number) =>
      Buffer.from(`\r\n--${BOUNDARY}\r\nContent-Disposition: form-data; name="note${i}"\r\n\r\n`)
    const total = head.length + piece + fields * (fieldHead(0).length + piece) + CLOSE.length + 2
    const reply = await streamHandIn(
      session,
      function* () {
        yield head
        yield* filler(piece)
        for (let i = 0; i < fields; i++) {
          yield fieldHead(i)
          yield* filler(piece)
        }
        yield Buffer.from('\r\n')
        yield CLOSE
      },
      total,
    )
    expect(reply.status).toBe(413)
    expect(reply.body.error!.code).toBe('upload_too_large')
    expect(reply.body.error!.message).toContain(`${LIMIT_MB} MB`)
    // The server stopped reading a little past the limit; socket buffers hold a few MB more.
    expect(reply.total).toBeGreaterThan(190 * MB)
    expect(reply.produced).toBeLessThan(40 * MB)
    expect(await stored()).toBe(before)
  })

  it('a file field the module does not declare is refused with a 400 naming it when its part header arrives', async () => {
    const session = await httpSession(fx.student2.email)
    const before = await stored()
    const head = Buffer.concat([
      fieldPart('payload', JSON.stringify(coldFlowPayload(log))),
      fileHead('table:extra', 'extra.csv'),
    ])
    // The undeclared file would be 100 MB; the answer must come long before.
    const reply = await streamHandIn(
      session,
      function* () {
        yield head
        yield* filler(100 * MB)
        yield Buffer.from('\r\n')
        yield CLOSE
      },
      head.length + 100 * MB,
    )
    expect(reply.status).toBe(400)
    expect(reply.body.error!.message).toContain('table:extra')
    expect(reply.body.error!.details!.field).toBe('table:extra')
    expect(reply.produced).toBeLessThan(40 * MB)
    expect(await stored()).toBe(before)
  })
})

describe('only the files the module declares, each once', () => {
  const handIn = (parts: { field: string; name: string; body: string }[]) => {
    let req = student.agent
      .post(handInPath())
      .set('x-csrf-token', student.csrf)
      .field('payload', JSON.stringify(coldFlowPayload(log)))
    for (const p of parts) req = req.attach(p.field, Buffer.from(p.body), p.name)
    return req
  }

  it('an extra file beside the declared one is a 400 that names it, and nothing is stored', async () => {
    const before = await stored()
    const res = await handIn([
      { field: 'table:run', name: 'run.csv', body: log.csv },
      { field: 'photo', name: 'jet.csv', body: log.csv },
    ])
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain('photo')
    expect(res.body.error.message).toContain('table:run')
    expect(await stored()).toBe(before)
  })

  it('the declared file sent twice is a 400 that names it, and nothing is stored', async () => {
    const before = await stored()
    const res = await handIn([
      { field: 'table:run', name: 'run.csv', body: log.csv },
      { field: 'table:run', name: 'run-again.csv', body: log.csv },
    ])
    expect(res.status).toBe(400)
    expect(res.body.error.details.field).toBe('table:run')
    expect(res.body.error.message).toMatch(/table:run.*two/)
    expect(await stored()).toBe(before)
  })

  it('the declared file alone is taken and stored', async () => {
    const res = await handIn([{ field: 'table:run', name: 'run.csv', body: log.csv }])
    expect(res.status).toBe(201)
    const files = await ctx.handle.db
      .select({ tableKey: submissionFiles.tableKey })
      .from(submissionFiles)
      .where(eq(submissionFiles.submissionId, res.body.id))
    expect(files).toEqual([{ tableKey: 'run' }])
  })
})

describe('a broken form upload is a 400 with a plain message, not a 500', () => {
  const MESSAGE = 'The upload was cut off or is not a valid form upload.'
  const raw = (contentType: string, body: string | Buffer) =>
    student.agent.post(handInPath()).set('x-csrf-token', student.csrf).set('Content-Type', contentType).send(body)

  it('a body cut off before its closing boundary', async () => {
    const before = await stored()
    const whole = Buffer.concat([
      fieldPart('payload', JSON.stringify(coldFlowPayload(log))),
      fileHead('table:run', 'run.csv'),
      Buffer.from(log.csv),
    ])
    const res = await raw(`multipart/form-data; boundary=${BOUNDARY}`, whole.subarray(0, whole.length - 100))
    expect(res.status).toBe(400)
    expect(res.body.error.code).toBe('bad_upload')
    expect(res.body.error.message).toBe(MESSAGE)
    expect(await stored()).toBe(before)
  })

  it('a multipart content type without a boundary', async () => {
    const res = await raw('multipart/form-data', 'payload=1')
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(MESSAGE)
  })

  it('a body that is not a form upload at all', async () => {
    const res = await raw('application/json', JSON.stringify(coldFlowPayload(log)))
    expect(res.status).toBe(400)
    expect(res.body.error.message).toBe(MESSAGE)
  })
})

describe('a refused hand-in whose body has a length within the limit', () => {
  /**
   * One request over a keep-alive agent with a single socket: the status, the Connection header
   * of the answer, and whether the request went out on a socket an earlier request had used.
   */
  function sendOnAgent(
    agent: http.Agent,
    session: { cookie: string; csrf: string },
    path: string,
    body: Buffer,
  ): Promise<{ status: number; connection: string | undefined; reused: boolean; code?: string }> {
    return new Promise((resolve, reject) => {
      const req = http.request(`${base}${path}`, {
        agent,
        method: 'POST',
        headers: {
          cookie: session.cookie,
          'x-csrf-token': session.csrf,
          'content-type': `multipart/form-data; boundary=${BOUNDARY}`,
          'content-length': String(body.length),
        },
      })
      req.on('response', (res) => {
        const chunks: Buffer[] = []
        res.on('data', (c: Buffer) => chunks.push(c))
        res.on('end', () => {
          const parsed = JSON.parse(Buffer.concat(chunks).toString('utf8')) as { error?: { code: string } }
          resolve({
            status: res.statusCode ?? 0,
            connection: res.headers.connection,
            reused: req.reusedSocket,
            code: parsed.error?.code,
          })
        })
      })
      req.on('error', reject)
      req.end(body)
    })
  }

  it('is answered without closing the connection, so the answer cannot be lost to a reset and the next request reuses it', async () => {
    const session = await httpSession(fx.student2.email)
    // A hand-in of 1.5 MB (under the limit) to a module that is not there: refused before the body is read.
    const body = Buffer.concat([
      fieldPart('payload', JSON.stringify(coldFlowPayload(log))),
      fileHead('table:run', 'run.csv'),
      ...filler(Math.round(1.5 * MB)),
      Buffer.from('\r\n'),
      CLOSE,
    ])
    const agent = new http.Agent({ keepAlive: true, maxSockets: 1 })
    try {
      const missing = `/api/courses/${fx.courseId}/modules/${mod.id + 100_000}/submissions`
      const first = await sendOnAgent(agent, session, missing, body)
      expect(first.status).toBe(404)
      expect(first.connection).not.toBe('close')
      const second = await sendOnAgent(agent, session, missing, body)
      expect(second.status).toBe(404)
      expect(second.reused).toBe(true)
    } finally {
      agent.destroy()
    }
  })
})

describe('a photograph has its own 10 MB beside the hand-in limit', () => {
  let jet: CreatedModule
  // Noise compresses badly: about 3 MB of PNG, over the test app's 2 MB limit for logs.
  const noisy = (width: number, height: number) =>
    sharp({
      create: { width, height, channels: 3, background: '#888', noise: { type: 'gaussian', mean: 128, sigma: 60 } },
    })
      .png({ compressionLevel: 1 })
      .toBuffer()

  beforeAll(async () => {
    const inst = await signedInAs(ctx, fx.instructor.email)
    jet = await createModuleAs(inst, fx.courseId, JET_SHEET)
    await publishAs(inst, fx.courseId, jet)
  })
  const jetHandIns = async () =>
    (await ctx.handle.db.select({ id: submissions.id }).from(submissions).where(eq(submissions.moduleId, jet.id)))
      .length
  const send = (body: Buffer, marks: unknown) =>
    student.agent
      .post(`/api/courses/${fx.courseId}/modules/${jet.id}/submissions`)
      .set('x-csrf-token', student.csrf)
      .field('payload', JSON.stringify(jetPayload({ jet: marks })))
      .attach('photo:jet', body, 'jet.png')

  it('takes a 3 MB photograph when the hand-in limit is 2 MB', async () => {
    const { marks } = await jetPhotoFile('png', { width: 1100, height: 800 })
    const body = await noisy(1100, 800)
    expect(body.length).toBeGreaterThan(LIMIT_MB * MB)
    const res = await send(body, marks)
    expect(res.status, JSON.stringify(res.body)).toBe(201)
    expect(res.body.images[0].originalSha256).toMatch(/^[0-9a-f]{64}$/)
  })

  it('still stops a log at the hand-in limit on a sheet that also asks for a photograph', async () => {
    const inst = await signedInAs(ctx, fx.instructor.email)
    const both = await createModuleAs(
      inst,
      fx.courseId,
      currentDueDates(readFileSync(new URL('../../content/04-reading-the-jet.md', import.meta.url), 'utf8')),
    )
    await publishAs(inst, fx.courseId, both)
    const { bytes, marks } = await jetPhotoFile()
    const bigLog = Buffer.alloc(Math.round(2.5 * MB), '0,101.3\n')
    const res = await student.agent
      .post(`/api/courses/${fx.courseId}/modules/${both.id}/submissions`)
      .set('x-csrf-token', student.csrf)
      .field('payload', JSON.stringify({ images: { jet: marks } }))
      .attach('table:run', bigLog, 'run.csv')
      .attach('photo:jet', bytes, 'jet.png')
    expect(res.status).toBe(413)
    expect(res.body.error.details.field).toBe('table:run')
    expect(res.body.error.message).toContain(`${LIMIT_MB} MB`)
  })

  it('refuses a photograph over 10 MB with a 413 naming it, and stores nothing', async () => {
    const { marks } = await jetPhotoFile('png', { width: 2000, height: 1900 })
    const body = await noisy(2000, 1900)
    expect(body.length).toBeGreaterThan(10 * MB)
    const before = await jetHandIns()
    const res = await send(body, marks)
    expect(res.status).toBe(413)
    expect(res.body.error.details.field).toBe('photo:jet')
    expect(res.body.error.message).toContain('10 MB')
    expect(await jetHandIns()).toBe(before)
  })
})
