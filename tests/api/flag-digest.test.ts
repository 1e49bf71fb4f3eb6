import { eq, like } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mailOutbox, submissionFlags } from '../../server/db/schema'
import { queueFlagDigests } from '../../server/services/flag-digest'
import { currentDueDates } from '../../scripts/demo/seed-demo'
import { readFileSync } from 'node:fs'
import type { Fixture, TestContext } from '../helpers/app'
import { seedFixture, signedInAs, startTestApp } from '../helpers/app'
import { coldFlowCsv, coldFlowPayload } from '../helpers/cold-flow'
import { createModuleAs, publishAs } from '../helpers/modules'

let ctx: TestContext
let fx: Fixture

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
})
afterAll(async () => {
  await ctx.close()
})

describe('flag digest for teaching assistants', () => {
  it('sends one e-mail per TA of the section with every new flag, and nothing twice', async () => {
    // Earlier test files may have left undigested flags of their own: clear them first.
    await queueFlagDigests(ctx.handle.db, 'http://127.0.0.1:3000')
    const inst = await signedInAs(ctx, fx.instructor.email)
    const mod = await createModuleAs(
      inst,
      fx.courseId,
      currentDueDates(readFileSync(new URL('../../content/02-cold-flow-characterisation.md', import.meta.url), 'utf8')),
    )
    await publishAs(inst, fx.courseId, mod)
    const st = await signedInAs(ctx, fx.student.email)
    const ids: number[] = []
    for (let i = 0; i < 2; i++) {
      const log = coldFlowCsv({ thrustScale: 1.6 })
      const res = await st.agent
        .post(`/api/courses/${fx.courseId}/modules/${mod.id}/submissions`)
        .set('x-csrf-token', st.csrf)
        .field('payload', JSON.stringify(coldFlowPayload(log)))
        .attach('table:run', Buffer.from(log.csv), `run${i}.csv`)
      expect(res.status).toBe(201)
      ids.push(res.body.id)
    }
    const flags = (
      await Promise.all(
        ids.map((id) => ctx.handle.db.select().from(submissionFlags).where(eq(submissionFlags.submissionId, id))),
      )
    ).flat()
    expect(flags.length).toBeGreaterThanOrEqual(2)

    // At least this course's section A (one TA); hand-ins other files left waiting may have been
    // graded since by the background grader and flagged in their own courses.
    const queued = await queueFlagDigests(ctx.handle.db, 'http://127.0.0.1:3000')
    expect(queued).toBeGreaterThanOrEqual(1)
    const mail = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(like(mailOutbox.dedupeKey, `flag-digest:${fx.courseId}:%`))
    expect(mail).toHaveLength(1)
    expect(mail[0]!.toAddress).toBe(fx.ta.email)
    expect(mail[0]!.subject).toContain(`${flags.length} new flags`)
    for (const id of ids) expect(mail[0]!.textBody).toContain(`/review/${id}`)

    await queueFlagDigests(ctx.handle.db, 'http://127.0.0.1:3000')
    const after = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(like(mailOutbox.dedupeKey, `flag-digest:${fx.courseId}:%`))
    expect(after).toHaveLength(1)
  })
})
