import { createHash } from 'node:crypto'
import { and, count, eq, inArray } from 'drizzle-orm'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { enrollments, invitations, labGroups, mailOutbox, sections, users } from '../../server/db/schema'
import { createLogger } from '../../server/logger'
import { DEFAULT_OUTBOX_OPTIONS, drainOnce } from '../../server/mail/outbox-worker'
import { createSmtpSender } from '../../server/mail/transport'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, seedFixture, signedInAs, startTestApp, uniq } from '../helpers/app'
import type { CaughtMail } from '../helpers/maildev'
import { waitForMail } from '../helpers/maildev'

const APP_URL = 'http://127.0.0.1:3977'
let ctx: TestContext
let fx: Fixture
let inst: Client
const IMPORT = () => `/api/courses/${fx.courseId}/roster/import`
const PREVIEW = () => `${IMPORT()}/preview`
const INVITE = (token: string) => `/api/auth/invitations/${token}`

beforeAll(async () => {
  ctx = startTestApp({ APP_URL, INVITATION_TTL_HOURS: '72' })
  fx = await seedFixture(ctx)
  inst = await signedInAs(ctx, fx.instructor.email)
})
afterAll(async () => {
  await ctx.close()
})

const post = (c: Client, url: string, body: unknown) =>
  c.agent
    .post(url)
    .set('x-csrf-token', c.csrf)
    .send(body as object)

/** Row counts of every table an import writes (API test files run one at a time, so these are stable). */
async function tableCounts() {
  const db = ctx.handle.db
  const n = async (
    t: typeof users | typeof enrollments | typeof invitations | typeof mailOutbox | typeof sections | typeof labGroups,
  ) => (await db.select({ n: count() }).from(t))[0]!.n
  return {
    users: await n(users),
    enrollments: await n(enrollments),
    invitations: await n(invitations),
    outbox: await n(mailOutbox),
    sections: await n(sections),
    labGroups: await n(labGroups),
  }
}

/** Sends the outbox through the test SMTP server (the API test app runs no worker of its own). */
async function deliverMail(): Promise<void> {
  const sender = createSmtpSender(ctx.config)
  try {
    for (let i = 0; i < 10; i++) {
      if (
        (await drainOnce(ctx.handle.db, sender, createLogger('silent'), {
          ...DEFAULT_OUTBOX_OPTIONS,
          batchSize: 50,
        })) === 0
      )
        break
    }
  } finally {
    sender.close()
  }
}

const linkIn = (m: CaughtMail) => {
  const match = /(http\S+\/invitations\/([A-Za-z0-9_-]+))/.exec(m.text)
  if (!match) throw new Error(`no invitation link in: ${m.text}`)
  return { link: match[1]!, token: match[2]! }
}

async function userByEmail(email: string) {
  const rows = await ctx.handle.db.select().from(users).where(eq(users.email, email))
  return rows[0] ?? null
}

describe('roster import: preview', () => {
  it('classifies new people, people already enrolled as the file says, people whose enrolment changes, and invalid rows', async () => {
    const t = uniq()
    const csv = [
      'email,name,role,section,group',
      `new1.${t}@import.example,New Person ${t},student,A,G1`,
      `${fx.student.email},student ${t},student,A,G1`,
      `${fx.student2.email},Student Two,,A,`,
      `${fx.outsider.email},Outsider,ta,B,`,
      `not-an-address,Bad Address,student,,`,
    ].join('\n')
    const before = await tableCounts()
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(await tableCounts()).toEqual(before)
    const body = res.body
    expect(body.ok).toBe(false)
    expect(body.counts).toMatchObject({
      rows: 5,
      new: 1,
      changed: 1,
      moves: 1,
      unchanged: 1,
      invalid: 1,
      invitations: 1,
      enrollmentMails: 1,
    })
    expect(body.invitationValidHours).toBe(72)
    const byRow = new Map(body.rows.map((r: { row: number }) => [r.row, r]))
    expect(byRow.get(2)).toMatchObject({ kind: 'new', invite: true, section: 'A', group: 'G1' })
    expect(byRow.get(3)).toMatchObject({ kind: 'existing', changes: [], invite: false, notify: false })
    expect(byRow.get(4)).toMatchObject({ kind: 'existing', changes: [], moves: ['moves from section B to section A'] })
    // Enrolled in another course and has a password: enrolled here, told by e-mail, not invited.
    expect(byRow.get(5)).toMatchObject({ kind: 'existing', role: 'ta', invite: false, notify: true })
    expect((byRow.get(5) as { changes: string[] }).changes[0]).toContain('enrolled as teaching assistant')
    const bad = byRow.get(6) as { kind: string; problems: { column: string; message: string }[] }
    expect(bad.kind).toBe('invalid')
    expect(bad.problems).toEqual([
      { column: 'email', message: expect.stringContaining('"not-an-address" is not a valid e-mail address') },
    ])
  })

  it('reads headers without regard to case and with the usual other names, and lists columns it ignores', async () => {
    const t = uniq()
    const csv = `E-Mail Address;Display Name;ROLE;Lab Group;Student ID\nalias.${t}@import.example;Alias ${t};TA;;1234\n`
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(res.body.ok).toBe(true)
    expect(res.body.rows[0]).toMatchObject({
      email: `alias.${t}@import.example`,
      displayName: `Alias ${t}`,
      role: 'ta',
      kind: 'new',
    })
    expect(res.body.ignoredColumns).toEqual(['Student ID'])
  })

  it('names sections and lab groups it will create, and takes a new group’s section from the file', async () => {
    const t = uniq()
    const csv = `email,name,section,group\na.${t}@import.example,A ${t},Bay ${t},Rig ${t}\nb.${t}@import.example,B ${t},,Rig ${t}\n`
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(res.body.newSections).toEqual([`Bay ${t}`])
    expect(res.body.newGroups).toEqual([`Rig ${t}`])
    // The second row names only the group; the group's section comes with it.
    expect(res.body.rows[1]).toMatchObject({ section: `Bay ${t}`, group: `Rig ${t}` })
  })
})

describe('roster import: refused files', () => {
  async function expectRefused(csv: string, status: number, code: string, ...words: string[]) {
    const before = await tableCounts()
    for (const url of [PREVIEW(), IMPORT()]) {
      const res = await post(inst, url, { csv })
      expect(res.status, url).toBe(status)
      expect(res.body.error.code).toBe(code)
      for (const w of words) expect(res.body.error.message).toContain(w)
    }
    expect(await tableCounts()).toEqual(before)
  }

  it('refuses a file without the required columns, naming them', async () => {
    await expectRefused('role,section\nstudent,A\n', 422, 'roster_file_refused', 'email', 'name')
    const res = await post(inst, PREVIEW(), { csv: 'email,section\nx@import.example,A\n' })
    expect(res.body.error.details.problems[0].columns).toEqual(['name'])
  })

  it('refuses more than 2,000 people, saying the limit', async () => {
    const t = uniq()
    const rows = Array.from({ length: 2001 }, (_, i) => `p${i}.${t}@import.example,P ${i}`)
    await expectRefused(['email,name', ...rows].join('\n'), 422, 'roster_file_refused', '2,001', 'at most 2,000')
  })

  it('refuses a file over the byte limit, saying the limit', async () => {
    // Two bytes per character in UTF-8: under the character guard, over the byte limit.
    const name = 'é'.repeat(150_000)
    await expectRefused(`email,name\nbig@import.example,${name}\n`, 422, 'roster_file_refused', 'at most 256 KB')
    // Plain ASCII over the limit is stopped by the request schema, naming the field.
    await expectRefused(
      `email,name\nbig@import.example,${'x'.repeat(270_000)}\n`,
      400,
      'validation_failed',
      'csv',
      '256 KB',
    )
  })

  it('refuses an empty file and a header with nobody under it', async () => {
    await expectRefused('', 400, 'validation_failed', 'csv')
    await expectRefused('email,name\n\n', 422, 'roster_file_refused', 'nobody')
  })

  it('refuses duplicate e-mails in the file, naming both rows, and writes nothing on confirm', async () => {
    const t = uniq()
    const csv = `email,name\ndup.${t}@import.example,One\nother.${t}@import.example,Other\nDUP.${t}@import.example,Two\n`
    const pre = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(pre.body.ok).toBe(false)
    expect(pre.body.rows[0].problems[0].message).toContain('row 4')
    expect(pre.body.rows[2].problems[0].message).toContain('row 2')
    expect(pre.body.rows[2].problems[0].column).toBe('email')
    const before = await tableCounts()
    const res = await post(inst, IMPORT(), { csv })
    expect(res.status).toBe(422)
    expect(res.body.error.code).toBe('roster_rows_invalid')
    expect(res.body.error.details.preview.counts.invalid).toBe(2)
    expect(await tableCounts()).toEqual(before)
    expect(await userByEmail(`other.${t}@import.example`)).toBeNull()
  })

  it('refuses invalid e-mail addresses, bad roles and a group in another section, naming row and column', async () => {
    const t = uniq()
    const csv = [
      'email,name,role,section,group',
      `ok.${t}@import.example,Fine,student,,`,
      `broken.${t}@,Broken,student,,`,
      `role.${t}@import.example,Role,professor,,`,
      `inst.${t}@import.example,Inst,instructor,,`,
      `grp.${t}@import.example,Group,student,B,G1`,
      `tag.${t}@import.example,TA with group,ta,,G1`,
      `,No Address,student,,`,
      `noname.${t}@import.example,,student,,`,
    ].join('\n')
    const before = await tableCounts()
    const pre = await post(inst, PREVIEW(), { csv }).expect(200)
    const problems = new Map(
      pre.body.rows.map((r: { row: number; problems: { column: string }[] }) => [
        r.row,
        r.problems.map((p) => p.column),
      ]),
    )
    expect(Object.fromEntries(problems)).toEqual({
      2: [],
      3: ['email'],
      4: ['role'],
      5: ['role'],
      6: ['group'],
      7: ['group'],
      8: ['email'],
      9: ['name'],
    })
    expect(pre.body.rows[4].problems[0].message).toContain('section "A"')
    const res = await post(inst, IMPORT(), { csv })
    expect(res.status).toBe(422)
    expect(res.body.error.message).toContain('7 rows have problems')
    expect(await tableCounts()).toEqual(before)
    expect(await userByEmail(`ok.${t}@import.example`)).toBeNull()
  })

  it('an empty role cell keeps an enrolled teaching assistant a teaching assistant', async () => {
    const res = await post(inst, PREVIEW(), { csv: `email,name,role,section\n${fx.ta.email},TA,,A\n` }).expect(200)
    expect(res.body.rows[0]).toMatchObject({ kind: 'existing', role: 'ta', changes: [] })
    const demote = await post(inst, PREVIEW(), { csv: `email,name,role\n${fx.ta.email},TA,student\n` }).expect(200)
    expect(demote.body.rows[0].changes).toEqual(['role teaching assistant → student'])
  })

  it('refuses the fixture instructor being imported as a student', async () => {
    const res = await post(inst, PREVIEW(), { csv: `email,name\n${fx.instructor.email},Me\n` }).expect(200)
    expect(res.body.rows[0].problems[0]).toMatchObject({ column: 'role' })
  })
})

describe('roster import: confirm, mail and invitations', () => {
  const t = uniq()
  const newA = `ana.${t}@import.example`
  const newB = `ben.${t}@import.example`
  const csvOf = () =>
    [
      'email,name,role,section,group',
      `${newA},Ana ${t},student,Bay ${t},Rig ${t}`,
      `${newB},Ben ${t},ta,Bay ${t},`,
      `${fx.outsider.email},Outsider,student,A,G1`,
      `${fx.student.email},Student,student,A,G1`,
    ].join('\n')
  let csv = ''
  const tokens: Record<string, string> = {}
  beforeAll(() => {
    csv = csvOf()
  })

  it('creates accounts without a password, enrolments, sections, groups and invitations in one go', async () => {
    const before = await tableCounts()
    const res = await post(inst, IMPORT(), { csv }).expect(200)
    expect(res.body).toEqual({
      created: 2,
      enrolled: 3,
      updated: 0,
      unchanged: 1,
      skipped: 0,
      invitationsSent: 2,
      enrollmentMailsSent: 1,
      sectionsCreated: [`Bay ${t}`],
      groupsCreated: [`Rig ${t}`],
    })
    const after = await tableCounts()
    expect(after).toEqual({
      users: before.users + 2,
      enrollments: before.enrollments + 3,
      invitations: before.invitations + 2,
      outbox: before.outbox + 3,
      sections: before.sections + 1,
      labGroups: before.labGroups + 1,
    })
    const ana = await userByEmail(newA)
    expect(ana).toMatchObject({ displayName: `Ana ${t}`, passwordHash: null })
    const db = ctx.handle.db
    const [enr] = await db
      .select({
        role: enrollments.role,
        section: sections.name,
        group: labGroups.name,
        groupSection: labGroups.sectionId,
        sectionId: sections.id,
      })
      .from(enrollments)
      .leftJoin(sections, eq(sections.id, enrollments.sectionId))
      .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
      .where(and(eq(enrollments.userId, ana!.id), eq(enrollments.courseId, fx.courseId)))
    expect(enr).toMatchObject({ role: 'student', section: `Bay ${t}`, group: `Rig ${t}` })
    expect(enr!.groupSection).toBe(enr!.sectionId)
    const roster = await inst.agent.get(`/api/courses/${fx.courseId}/roster`).expect(200)
    expect(roster.body.find((r: { email: string }) => r.email === newB)).toMatchObject({
      role: 'ta',
      sectionName: `Bay ${t}`,
    })
    expect(roster.body.find((r: { email: string }) => r.email === fx.outsider.email)).toMatchObject({
      role: 'student',
      sectionName: 'A',
      labGroupName: 'G1',
    })
  })

  it('e-mails each new person a set-password link whose token is stored only as its SHA-256', async () => {
    await deliverMail()
    const to = (m: CaughtMail, a: string) => m.to[0]?.address === a
    const all = await waitForMail(
      (m) =>
        m.some((x) => to(x, newA)) &&
        m.some((x) => to(x, newB)) &&
        m.some((x) => to(x, fx.outsider.email) && x.subject.includes('added')),
    )
    for (const address of [newA, newB]) {
      const mine = all.filter((m) => m.to[0]?.address === address)
      expect(mine).toHaveLength(1)
      const { link, token } = linkIn(mine[0]!)
      expect(link).toBe(`${APP_URL}/invitations/${token}`)
      expect(Buffer.from(token, 'base64url')).toHaveLength(32)
      const user = await userByEmail(address)
      const stored = await ctx.handle.db.select().from(invitations).where(eq(invitations.userId, user!.id))
      expect(stored).toHaveLength(1)
      expect(stored[0]!.tokenHash).toBe(createHash('sha256').update(token).digest('hex'))
      // INVITATION_TTL_HOURS is 72 for this file (the default is 168, a week).
      expect(Math.abs(stored[0]!.expiresAt.getTime() - stored[0]!.createdAt.getTime() - 72 * 3_600_000)).toBeLessThan(
        60_000,
      )
      expect(stored[0]!.usedAt).toBeNull()
      expect(JSON.stringify(stored)).not.toContain(token)
      tokens[address] = token
    }
    // The person who already had an account is told they were added, with no invitation.
    const told = all.filter((m) => m.to[0]?.address === fx.outsider.email && m.subject.includes('added'))
    expect(told.length).toBeGreaterThanOrEqual(1)
    expect(told[0]!.text).not.toContain('/invitations/')
  })

  it('importing the same file again changes nothing and sends no mail', async () => {
    const before = await tableCounts()
    const pre = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(pre.body.counts).toMatchObject({
      rows: 4,
      new: 0,
      changed: 0,
      unchanged: 4,
      invitations: 0,
      enrollmentMails: 0,
    })
    const res = await post(inst, IMPORT(), { csv }).expect(200)
    expect(res.body).toMatchObject({
      created: 0,
      enrolled: 0,
      updated: 0,
      unchanged: 4,
      invitationsSent: 0,
      enrollmentMailsSent: 0,
      sectionsCreated: [],
      groupsCreated: [],
    })
    expect(await tableCounts()).toEqual(before)
  })

  it('the link shows who it is for, without signing in', async () => {
    const anon = await anonymous(ctx)
    const res = await anon.agent.get(INVITE(tokens[newA]!)).expect(200)
    expect(res.body).toMatchObject({
      email: newA,
      displayName: `Ana ${t}`,
      courseTitle: expect.stringContaining('Test propulsion lab'),
    })
  })

  it('a short password is refused naming the field, and the link still works afterwards', async () => {
    const anon = await anonymous(ctx)
    const res = await post(anon, INVITE(tokens[newA]!), { password: 'short' })
    expect(res.status).toBe(400)
    expect(res.body.error.message).toContain('password')
    expect(res.body.error.message).toContain('10')
    await anon.agent.get(INVITE(tokens[newA]!)).expect(200)
  })

  it('sets the password once and signs the person in; the link is then refused as used', async () => {
    const anon = await anonymous(ctx)
    const password = `rig-${t}-pressure`
    const res = await post(anon, INVITE(tokens[newA]!), { password }).expect(200)
    expect(res.body.user).toMatchObject({ email: newA })
    const session = await anon.agent.get('/api/auth/session').expect(200)
    expect(session.body.user?.email).toBe(newA)
    const courses = await anon.agent.get('/api/courses').expect(200)
    expect(courses.body.map((c: { id: number }) => c.id)).toEqual([fx.courseId])
    // The new password signs in from a fresh client.
    await signedInAs(ctx, newA, password)
    const again = await anonymous(ctx)
    const reuse = await post(again, INVITE(tokens[newA]!), { password: 'another-password-123' })
    expect(reuse.status).toBe(410)
    expect(reuse.body.error.code).toBe('invitation_used')
    expect(reuse.body.error.message).toContain('already been used')
    expect((await again.agent.get(INVITE(tokens[newA]!))).status).toBe(410)
    // The refused attempt did not change the password.
    await signedInAs(ctx, newA, password)
  })

  it('two uses of one link at the same moment: exactly one sets the password', async () => {
    const t2 = uniq()
    const email = `race.${t2}@import.example`
    await post(inst, IMPORT(), { csv: `email,name\n${email},Race ${t2}\n` }).expect(200)
    await deliverMail()
    const mail = (await waitForMail((m) => m.some((x) => x.to[0]?.address === email))).find(
      (x) => x.to[0]?.address === email,
    )!
    const { token } = linkIn(mail)
    const [a, b] = [await anonymous(ctx), await anonymous(ctx)]
    const results = await Promise.all([
      post(a, INVITE(token), { password: 'first-password-1' }),
      post(b, INVITE(token), { password: 'second-password-2' }),
    ])
    expect(results.map((r) => r.status).sort()).toEqual([200, 410])
    const winner = results.find((r) => r.status === 200)!
    const password = winner === results[0] ? 'first-password-1' : 'second-password-2'
    await signedInAs(ctx, email, password)
  })

  it('an expired link is refused; importing again sends a fresh invitation to that person only', async () => {
    const user = await userByEmail(newB)
    await ctx.handle.db
      .update(invitations)
      .set({ expiresAt: new Date(Date.now() - 60_000) })
      .where(eq(invitations.userId, user!.id))
    const anon = await anonymous(ctx)
    const get = await anon.agent.get(INVITE(tokens[newB]!))
    expect(get.status).toBe(410)
    expect(get.body.error.code).toBe('invitation_expired')
    expect(get.body.error.message).toContain('expired')
    const set = await post(anon, INVITE(tokens[newB]!), { password: 'too-late-password' })
    expect(set.status).toBe(410)
    expect((await userByEmail(newB))!.passwordHash).toBeNull()

    const pre = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(pre.body.counts).toMatchObject({ invitations: 1, new: 0 })
    expect(pre.body.rows.find((r: { email: string }) => r.email === newB).invite).toBe(true)
    const res = await post(inst, IMPORT(), { csv }).expect(200)
    expect(res.body).toMatchObject({ created: 0, invitationsSent: 1 })
    const rows = await ctx.handle.db
      .select({ id: invitations.id })
      .from(invitations)
      .where(eq(invitations.userId, user!.id))
    expect(rows).toHaveLength(2)
  })

  it('an unknown token is a 404', async () => {
    const anon = await anonymous(ctx)
    const token = Buffer.alloc(32, 7).toString('base64url')
    const get = await anon.agent.get(INVITE(token))
    expect(get.status).toBe(404)
    expect(get.body.error.code).toBe('invitation_not_found')
    expect((await post(anon, INVITE(token), { password: 'whatever-long-enough' })).status).toBe(404)
  })
})

describe('roster import: files as they come', () => {
  /** Windows-1252 bytes of text whose characters are all Latin-1 (é = 0xE9, ü = 0xFC). */
  const cp1252 = (text: string) => Buffer.from([...text].map((c) => c.charCodeAt(0)))

  it('reads the bytes of a Windows-1252 semicolon file with split names, and says how it read it', async () => {
    const t = uniq()
    const file = cp1252(`Surname;Given name;Student e-mail\nM\u00fcller;Ren\u00e9e;renee.${t}@import.example\n`)
    const res = await post(inst, PREVIEW(), { file: file.toString('base64') }).expect(200)
    expect(res.body.rows[0]).toMatchObject({ displayName: 'Renée Müller', email: `renee.${t}@import.example` })
    expect(res.body.reading).toEqual({
      encoding: 'windows-1252',
      delimiter: ';',
      columns: { email: ['Student e-mail'], name: ['Given name', 'Surname'] },
      nameOrder: { order: 'given-first', because: 'the header words are English' },
    })
    // Declared Hungarian: family name first.
    const hu = await post(inst, PREVIEW(), { file: file.toString('base64'), locale: 'hu' }).expect(200)
    expect(hu.body.rows[0].displayName).toBe('Müller Renée')
  })

  it('refuses a file with two e-mail columns, naming both, and one that is not base64', async () => {
    const before = await tableCounts()
    const file = Buffer.from('Email;Student e-mail;Name\na@import.example;b@import.example;A\n').toString('base64')
    for (const url of [PREVIEW(), IMPORT()]) {
      const res = await post(inst, url, { file })
      expect(res.status).toBe(422)
      expect(res.body.error.message).toContain('"Email" and "Student e-mail"')
    }
    const bad = await post(inst, PREVIEW(), { file: 'not base64!' })
    expect(bad.status).toBe(400)
    expect(bad.body.error.message).toContain('file')
    const both = await post(inst, PREVIEW(), { file, csv: 'email,name\n' })
    expect(both.status).toBe(400)
    expect(await tableCounts()).toEqual(before)
  })
})

describe('roster import: matching sections and groups, and moves', () => {
  const t = uniq()
  const people = {
    aletta: `aletta.${t}@import.example`,
    bram: `bram.${t}@import.example`,
    cato: `cato.${t}@import.example`,
  }
  const groupIds: Record<string, number> = {}
  const userIds: Record<string, number> = {}

  beforeAll(async () => {
    const db = ctx.handle.db
    for (const name of ['Group A1', 'Group A3']) {
      const [g] = await db
        .insert(labGroups)
        .values({ courseId: fx.courseId, sectionId: fx.sectionA, name })
        .$returningId()
      groupIds[name] = g!.id
    }
    for (const [key, email] of Object.entries(people)) {
      const [u] = await db
        .insert(users)
        .values({ email, displayName: `${key} ${t}`, passwordHash: 'not-a-real-hash' })
        .$returningId()
      userIds[key] = u!.id
      await db.insert(enrollments).values({
        userId: u!.id,
        courseId: fx.courseId,
        role: 'student',
        sectionId: fx.sectionA,
        labGroupId: groupIds['Group A1']!,
      })
    }
  })

  const groupOf = async (email: string) => {
    const rows = await ctx.handle.db
      .select({ group: labGroups.name })
      .from(enrollments)
      .innerJoin(users, eq(users.id, enrollments.userId))
      .leftJoin(labGroups, eq(labGroups.id, enrollments.labGroupId))
      .where(and(eq(users.email, email), eq(enrollments.courseId, fx.courseId)))
    return rows[0]?.group ?? null
  }

  it('"a1", " A1 " and "group a1" are the course\'s Group A1: nothing is created and nobody moves', async () => {
    const csv = [
      'email,name,group',
      `${people.aletta},Aletta,a1`,
      `${people.bram},Bram, A1 `,
      `${people.cato},Cato,group a1`,
    ].join('\n')
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(res.body.newGroups).toEqual([])
    expect(res.body.counts).toMatchObject({ moves: 0, unchanged: 3, changed: 0 })
    expect(res.body.rows.map((r: { group: string }) => r.group)).toEqual(['Group A1', 'Group A1', 'Group A1'])
  })

  it('a near miss is a problem on its row with a suggestion, not a new group, and nothing is written', async () => {
    const csv = `email,name,section,group\nnear.${t}@import.example,Near,A,Goup A1\n`
    const before = await tableCounts()
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(res.body.ok).toBe(false)
    expect(res.body.newGroups).toEqual([])
    expect(res.body.rows[0].problems).toEqual([
      { column: 'group', message: expect.stringContaining('did you mean Group A1?') },
    ])
    const confirm = await post(inst, IMPORT(), { csv })
    expect(confirm.status).toBe(422)
    expect(await tableCounts()).toEqual(before)
  })

  it('two new names a slip apart in one file: the rarer one is a problem, not a second new group', async () => {
    const csv = [
      'email,name,group',
      `n1.${t}@import.example,N1,Nozzle ${t}`,
      `n2.${t}@import.example,N2,Nozle ${t}`,
      `n3.${t}@import.example,N3,nozzle ${t}`,
    ].join('\n')
    const res = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(res.body.newGroups).toEqual([`Nozzle ${t}`])
    expect(res.body.rows.map((r: { problems: unknown[] }) => r.problems.length)).toEqual([0, 1, 0])
    expect(res.body.rows[1].problems[0].message).toContain(`did you mean Nozzle ${t}?`)
  })

  it('says a move in words and counts it apart; an unticked move is left out on confirm', async () => {
    const csv = [
      'email,name,group',
      `${people.aletta},Aletta,a3`,
      `${people.bram},Bram,Group A3`,
      `newcomer.${t}@import.example,Newcomer ${t},A1`,
    ].join('\n')
    const pre = await post(inst, PREVIEW(), { csv }).expect(200)
    expect(pre.body.counts).toMatchObject({ new: 1, moves: 2, changed: 0, unchanged: 0 })
    expect(pre.body.rows[0]).toMatchObject({ moves: ['moves from Group A1 to Group A3'], changes: [] })
    expect(pre.body.newGroups).toEqual([])

    const res = await post(inst, IMPORT(), { csv, skip: [{ row: 2, email: people.aletta }] }).expect(200)
    expect(res.body).toMatchObject({ created: 1, updated: 1, skipped: 1, groupsCreated: [] })
    expect(await groupOf(people.aletta)).toBe('Group A1')
    expect(await groupOf(people.bram)).toBe('Group A3')
    expect(await groupOf(`newcomer.${t}@import.example`)).toBe('Group A1')
  })

  it('refuses a skip that is not a move in this file, naming the row, and writes nothing', async () => {
    const csv = ['email,name,group', `${people.cato},Cato,A3`, `other.${t}@import.example,Other,A1`].join('\n')
    const before = await tableCounts()
    for (const skip of [
      [{ row: 3, email: `other.${t}@import.example` }],
      [{ row: 2, email: people.bram }],
      [{ row: 9, email: people.cato }],
    ]) {
      const res = await post(inst, IMPORT(), { csv, skip })
      expect(res.status).toBe(422)
      expect(res.body.error.code).toBe('roster_skip_invalid')
      expect(res.body.error.message).toContain(`row ${skip[0]!.row}`)
    }
    const malformed = await post(inst, IMPORT(), { csv, skip: [{ row: 'two' }] })
    expect(malformed.status).toBe(400)
    expect(malformed.body.error.message).toContain('skip')
    expect(await tableCounts()).toEqual(before)
    expect(await groupOf(people.cato)).toBe('Group A1')
  })
})

describe('roster import: who may import', () => {
  const csv = () => `email,name\nwho.${uniq()}@import.example,Who\n`

  it('a teaching assistant and a student of the course are refused (403), writing nothing', async () => {
    const before = await tableCounts()
    for (const email of [fx.ta.email, fx.student.email]) {
      const c = await signedInAs(ctx, email)
      for (const url of [PREVIEW(), IMPORT()]) {
        const res = await post(c, url, { csv: csv() })
        expect(res.status).toBe(403)
        expect(res.body.error.code).toBe('forbidden')
      }
    }
    expect(await tableCounts()).toEqual(before)
  })

  it("another course's instructor gets 404 for this course", async () => {
    // The fixture instructor teaches a course of their own; here they import into the other course.
    const before = await tableCounts()
    const res = await post(inst, `/api/courses/${fx.otherCourseId}/roster/import`, { csv: csv() })
    expect(res.status).toBe(404)
    const other = await ctx.handle.db
      .select({ n: count() })
      .from(enrollments)
      .where(and(eq(enrollments.courseId, fx.otherCourseId), inArray(enrollments.role, ['student', 'ta'])))
    expect(other[0]!.n).toBe(1)
    expect(await tableCounts()).toEqual(before)
  })
})
