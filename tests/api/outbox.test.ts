import { and, eq, like, notLike } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { mailOutbox } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { backoffMs, drainOnce } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import type { MailSender } from '../../server/mail/transport'
import { enqueueMail } from '../../server/repositories/outbox'
import type { TestContext } from '../helpers/app'
import { startTestApp, uniq } from '../helpers/app'
import { caughtMail, waitForMail } from '../helpers/maildev'

let ctx: TestContext
const logger = createLogger('silent')
const opts = { pollMs: 1000, batchSize: 5, maxAttempts: 3, baseBackoffMs: 60_000, maxBackoffMs: 600_000 }

beforeAll(async () => {
  ctx = startTestApp()
  // Test files run one at a time (vite.config.ts), and API tests never drain the outbox: receipts
  // and notices earlier files queued are still pending. Nobody waits for them any more, so they are
  // set aside here and the drains below see only this file's messages.
  await ctx.handle.db
    .update(mailOutbox)
    .set({ status: 'failed', lastError: 'set aside by the outbox test' })
    .where(and(eq(mailOutbox.status, 'pending'), notLike(mailOutbox.dedupeKey, 'test:%')))
})
afterAll(async () => {
  // These rows are test-only; keep the test database tidy for later files.
  await ctx.handle.db.delete(mailOutbox).where(like(mailOutbox.dedupeKey, 'test:%'))
  await ctx.close()
})

const mails = (tag: string, n: number) =>
  Array.from({ length: n }, (_, i) => ({
    dedupeKey: `test:${tag}`,
    toAddress: `r${i}.${tag}@test.example`,
    toName: `Recipient ${i}`,
    subject: `Outbox test ${tag} #${i}`,
    textBody: `Plain text ${i}`,
    htmlBody: `<p>HTML ${i}</p>`,
  }))

describe('mail outbox', () => {
  it('queuing the same message for the same person twice keeps one row', async () => {
    const tag = uniq()
    await enqueueMail(ctx.handle.db, mails(tag, 2))
    await enqueueMail(ctx.handle.db, mails(tag, 2))
    const rows = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `test:${tag}`))
    expect(rows).toHaveLength(2)
  })

  it('two workers draining at once deliver every message exactly once through SMTP', async () => {
    const tag = uniq()
    const n = 23
    await enqueueMail(ctx.handle.db, mails(tag, n))
    const a = createSmtpSender(ctx.config)
    const b = createSmtpSender(ctx.config)
    // Two independent database pools, as two server processes would have.
    const other = startTestApp()
    try {
      let sent = 0
      for (let round = 0; round < 10; round++) {
        const [x, y] = await Promise.all([
          drainOnce(ctx.handle.db, a, logger, opts),
          drainOnce(other.handle.db, b, logger, opts),
        ])
        sent += x + y
        if (x + y === 0) break
      }
      // Other test files may have left mail of their own pending; it is sent too.
      expect(sent).toBeGreaterThanOrEqual(n)
    } finally {
      a.close()
      b.close()
      await other.close()
    }
    const caught = await waitForMail((all) => all.filter((m) => m.subject.includes(tag)).length >= n)
    const mine = caught.filter((m) => m.subject.includes(tag))
    expect(mine).toHaveLength(n)
    expect(new Set(mine.map((m) => m.to[0]?.address)).size).toBe(n)
    expect(mine[0]!.text.trim()).toMatch(/^Plain text \d+$/)
    expect(mine[0]!.html).toContain('<p>HTML')
    const rows = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `test:${tag}`))
    expect(rows.every((r) => r.status === 'sent' && r.attempts === 1 && r.sentAt !== null)).toBe(true)
  })

  it('a failed send is kept with its error and retried later with back-off, then given up after the last attempt', async () => {
    const tag = uniq()
    await enqueueMail(ctx.handle.db, mails(tag, 1))
    const failing: MailSender = {
      send: () => Promise.reject(new Error('SMTP 451 try again later')),
      close: () => undefined,
    }
    const before = Date.now()
    const sent = await drainOnce(ctx.handle.db, failing, logger, opts)
    expect(sent).toBe(0)
    const [row] = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `test:${tag}`))
    expect(row).toMatchObject({ status: 'pending', attempts: 1, lastError: 'SMTP 451 try again later' })
    expect(row!.nextAttemptAt.getTime()).toBeGreaterThanOrEqual(before + backoffMs(1, opts) - 1000)
    // Not due yet: a second drain leaves it alone.
    await drainOnce(ctx.handle.db, failing, logger, opts)
    const [still] = await ctx.handle.db.select().from(mailOutbox).where(eq(mailOutbox.id, row!.id))
    expect(still!.attempts).toBe(1)
    // Make it due and fail it until the attempts run out.
    for (let i = 0; i < 2; i++) {
      await ctx.handle.db
        .update(mailOutbox)
        .set({ nextAttemptAt: new Date(Date.now() - 1000) })
        .where(eq(mailOutbox.id, row!.id))
      await drainOnce(ctx.handle.db, failing, logger, opts)
    }
    const [last] = await ctx.handle.db.select().from(mailOutbox).where(eq(mailOutbox.id, row!.id))
    expect(last).toMatchObject({ status: 'failed', attempts: 3 })
    expect((await caughtMail()).some((m) => m.subject.includes(tag))).toBe(false)
  })

  it('a message the mail server accepted is not queued again when recording it as sent is slow for a moment', async () => {
    const tag = uniq()
    await enqueueMail(ctx.handle.db, mails(tag, 1))
    // The drainer's statements give up after 0.5 s, as a loaded server's might.
    const impatient = startTestApp({ DB_QUERY_TIMEOUT_MS: '500' })
    const smtp = createSmtpSender(ctx.config)
    let held: Promise<void> | undefined
    const slowAfterSend: MailSender = {
      send: async (m) => {
        await smtp.send(m)
        // Another connection locks the row for 2 s: the first tries to record the send time out.
        const conn = await ctx.handle.pool.getConnection()
        await conn.beginTransaction()
        await conn.query('SELECT id FROM mail_outbox WHERE dedupe_key = ? AND to_address = ? FOR UPDATE', [
          `test:${tag}`,
          m.to,
        ])
        held = new Promise<void>((r) => setTimeout(r, 2000)).then(async () => {
          await conn.commit()
          conn.release()
        })
      },
      close: () => smtp.close(),
    }
    try {
      const sent = await drainOnce(impatient.handle.db, slowAfterSend, logger, opts)
      expect(sent).toBeGreaterThanOrEqual(1)
      await held
    } finally {
      smtp.close()
      await impatient.close()
    }
    const [row] = await ctx.handle.db
      .select()
      .from(mailOutbox)
      .where(eq(mailOutbox.dedupeKey, `test:${tag}`))
    expect(row).toMatchObject({ status: 'sent', attempts: 1, lastError: null })
    const caught = await waitForMail((all) => all.some((m) => m.subject.includes(tag)))
    expect(caught.filter((m) => m.subject.includes(tag))).toHaveLength(1)
  })

  it('back-off doubles per attempt up to the cap', () => {
    expect([1, 2, 3, 4, 5, 6].map((a) => backoffMs(a, opts))).toEqual([
      60_000, 120_000, 240_000, 480_000, 600_000, 600_000,
    ])
  })
})
