import { createHash } from 'node:crypto'
import { eq } from 'drizzle-orm'
import ICAL from 'ical.js'
import request from 'supertest'
import { afterAll, beforeAll, describe, expect, it } from 'vitest'
import { and } from 'drizzle-orm'
import { calendarTokens, courses, enrollments, labGroups } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from '../helpers/app'
import { anonymous, signedInAs, seedFixture, startTestApp } from '../helpers/app'
import type { CreatedModule } from '../helpers/modules'
import { createModuleAs, moduleSource, publishAs } from '../helpers/modules'
import { cancelBooking, insertBooking, insertLabGroup, insertSlot, insertStand } from '../helpers/stand-rows'

let ctx: TestContext
let fx: Fixture
let instructor: Client
const sheets: Record<'issued' | 'second' | 'draft' | 'withdrawn' | 'elsewhere', CreatedModule | undefined> = {
  issued: undefined,
  second: undefined,
  draft: undefined,
  withdrawn: undefined,
  elsewhere: undefined,
}
let otherCode = ''

/** moduleSource's due date, 2027-02-09 17:00 in America/Denver (MST, UTC−7 in February), as an instant. */
const DUE = Date.parse('2027-02-10T00:00:00Z')
const EXTENDED = '2027-02-12T18:30:00Z'

interface ParsedEvent {
  uid: string
  summary: string
  start: number
  /** Null for an event without DTEND (a moment). */
  end: number | null
  location: string | null
  url: string | null
  description: string
}

function parseFeed(text: string): ParsedEvent[] {
  const cal = new ICAL.Component(ICAL.parse(text))
  return cal.getAllSubcomponents('vevent').map((v) => {
    const e = new ICAL.Event(v)
    return {
      uid: e.uid,
      summary: e.summary,
      start: e.startDate.toJSDate().getTime(),
      end: v.hasProperty('dtend') ? e.endDate.toJSDate().getTime() : null,
      location: e.location ?? null,
      url: (v.getFirstPropertyValue('url') as string | null) ?? null,
      description: e.description,
    }
  })
}

const feedPath = (url: string) => new URL(url).pathname
const tokenOf = (url: string) =>
  feedPath(url)
    .replace('/api/calendar/', '')
    .replace(/\.ics$/, '')

async function makeFeed(c: Client): Promise<string> {
  const res = await c.agent.post('/api/me/calendar-feed').set('x-csrf-token', c.csrf).expect(201)
  return (res.body as { url: string }).url
}

const fetchFeed = (url: string) => request(ctx.created.app).get(feedPath(url))

beforeAll(async () => {
  ctx = startTestApp()
  fx = await seedFixture(ctx)
  const db = ctx.handle.db
  await db.update(courses).set({ timeZone: 'America/Denver' }).where(eq(courses.id, fx.courseId))
  instructor = await signedInAs(ctx, fx.instructor.email)
  sheets.issued = await createModuleAs(instructor, fx.courseId, moduleSource('Nozzle flow'))
  await publishAs(instructor, fx.courseId, sheets.issued)
  sheets.second = await createModuleAs(instructor, fx.courseId, moduleSource('Blowdown'))
  await publishAs(instructor, fx.courseId, sheets.second)
  sheets.draft = await createModuleAs(instructor, fx.courseId, moduleSource('Still being prepared'))
  sheets.withdrawn = await createModuleAs(instructor, fx.courseId, moduleSource('Taken back'))
  await publishAs(instructor, fx.courseId, sheets.withdrawn)
  await instructor.agent
    .post(`/api/courses/${fx.courseId}/modules/${sheets.withdrawn.id}/unpublish`)
    .set('x-csrf-token', instructor.csrf)
    .expect(200)
  // A course the student is not in, taught by the same instructor.
  await db.insert(enrollments).values({ userId: fx.instructor.id, courseId: fx.otherCourseId, role: 'instructor' })
  sheets.elsewhere = await createModuleAs(instructor, fx.otherCourseId, moduleSource('Other course sheet'))
  await publishAs(instructor, fx.otherCourseId, sheets.elsewhere)
  const [other] = await db.select({ code: courses.code }).from(courses).where(eq(courses.id, fx.otherCourseId))
  otherCode = other!.code
  // The first student has a later due date on the first sheet.
  await instructor.agent
    .put(`/api/courses/${fx.courseId}/extensions/${sheets.issued.id}/${fx.student.id}`)
    .set('x-csrf-token', instructor.csrf)
    .send({ dueAt: EXTENDED, note: 'Feed test extension.' })
    .expect(200)
})

afterAll(async () => {
  await ctx.close()
})

describe('calendar feed contents', () => {
  it('holds a student’s due dates of issued sheets, with their extension, and nothing else', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    const url = await makeFeed(student)
    const res = await fetchFeed(url).expect(200)
    expect(res.headers['content-type']).toBe('text/calendar; charset=utf-8')
    expect(res.headers['cache-control']).toBe('private, no-store')
    const events = parseFeed(res.text)
    const [code] = await ctx.handle.db.select({ code: courses.code }).from(courses).where(eq(courses.id, fx.courseId))
    expect(events.map((e) => e.summary).sort()).toEqual([
      `${code!.code}: Blowdown due`,
      `${code!.code}: Nozzle flow due`,
    ])
    const nozzle = events.find((e) => e.summary.includes('Nozzle flow'))!
    const blowdown = events.find((e) => e.summary.includes('Blowdown'))!
    // The extension replaces the class's due date for this person.
    expect(nozzle.start).toBe(Date.parse(EXTENDED))
    expect(nozzle.description).toContain('extended')
    expect(blowdown.start).toBe(DUE)
    // The course's zone and the local time there are stated.
    expect(blowdown.description).toContain('17:00')
    expect(blowdown.description).toContain('America/Denver')
    expect(blowdown.url).toBe(
      `${ctx.config.APP_URL.replace(/\/$/, '')}/c/${fx.courseSlug}/sheets/${sheets.second!.slug}`,
    )
    for (const absent of ['Still being prepared', 'Taken back', 'Other course sheet']) {
      expect(res.text).not.toContain(absent)
    }
  })

  it('keeps the same UID for each event across two fetches, distinct per person', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    const url = await makeFeed(student)
    const first = parseFeed((await fetchFeed(url).expect(200)).text)
    const second = parseFeed((await fetchFeed(url).expect(200)).text)
    expect(first.length).toBe(2)
    expect(second.map((e) => e.uid).sort()).toEqual(first.map((e) => e.uid).sort())
    expect(new Set(first.map((e) => e.uid)).size).toBe(2)
    const other = await signedInAs(ctx, fx.student2.email)
    const theirs = parseFeed((await fetchFeed(await makeFeed(other)).expect(200)).text)
    expect(theirs.map((e) => e.uid).filter((u) => first.some((f) => f.uid === u))).toEqual([])
    // No extension for the second student: the class's due date.
    expect(theirs.every((e) => e.start === DUE)).toBe(true)
  })

  it('gives staff the class due dates of every course they teach, without a student’s extension', async () => {
    const events = parseFeed((await fetchFeed(await makeFeed(instructor)).expect(200)).text)
    expect(events.map((e) => e.summary)).toContain(`${otherCode}: Other course sheet due`)
    const nozzle = events.find((e) => e.summary.includes('Nozzle flow'))!
    expect(nozzle.start).toBe(DUE)
    expect(events.some((e) => e.summary.includes('Still being prepared') || e.summary.includes('Taken back'))).toBe(
      false,
    )
  })
})

describe('calendar feed address', () => {
  it('stores only the token’s hash', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    const url = await makeFeed(student)
    const token = tokenOf(url)
    expect(token).toMatch(/^[A-Za-z0-9_-]{43}$/)
    const rows = await ctx.handle.db.select().from(calendarTokens).where(eq(calendarTokens.userId, fx.student.id))
    expect(rows.length).toBe(1)
    expect(JSON.stringify(rows)).not.toContain(token)
    expect(rows[0]!.tokenHash).toBe(createHash('sha256').update(token).digest('hex'))
    const status = await student.agent.get('/api/me/calendar-feed').expect(200)
    expect(status.body.active).toBe(true)
    expect(JSON.stringify(status.body)).not.toContain(token)
  })

  it('a new address makes the old one stop working', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    const old = await makeFeed(student)
    await fetchFeed(old).expect(200)
    const fresh = await makeFeed(student)
    expect(fresh).not.toBe(old)
    await fetchFeed(old).expect(404)
    await fetchFeed(fresh).expect(200)
  })

  it('turning the feed off makes its address 404', async () => {
    const student = await signedInAs(ctx, fx.student2.email)
    const url = await makeFeed(student)
    await student.agent.delete('/api/me/calendar-feed').set('x-csrf-token', student.csrf).expect(204)
    await fetchFeed(url).expect(404)
    const status = await student.agent.get('/api/me/calendar-feed').expect(200)
    expect(status.body).toEqual({ active: false, createdAt: null })
  })

  it('answers an unknown or malformed token with the same bare 404', async () => {
    const unknown = await request(ctx.created.app)
      .get(`/api/calendar/${'B'.repeat(43)}.ics`)
      .expect(404)
    for (const bad of ['abc', 'B'.repeat(44), `${'B'.repeat(42)}!`, '%ZZ', "'%20OR%201=1"]) {
      const res = await request(ctx.created.app).get(`/api/calendar/${bad}.ics`)
      expect(res.status, bad).toBe(404)
      expect(res.body, bad).toEqual(unknown.body)
    }
    expect(unknown.text).not.toContain('BEGIN:VCALENDAR')
  })
})

describe('calendar feed authorization', () => {
  it('signed out: 401 on every /api/me/calendar-feed call', async () => {
    const anon = await anonymous(ctx)
    await anon.agent.get('/api/me/calendar-feed').expect(401)
    await anon.agent.post('/api/me/calendar-feed').set('x-csrf-token', anon.csrf).expect(401)
    await anon.agent.delete('/api/me/calendar-feed').set('x-csrf-token', anon.csrf).expect(401)
  })

  it('a person sees only their own feed; another’s address shows them nothing of their own', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    await makeFeed(student)
    const outsider = await signedInAs(ctx, fx.outsider.email)
    await outsider.agent.delete('/api/me/calendar-feed').set('x-csrf-token', outsider.csrf).expect(204)
    // Turning one's own feed off leaves the student's alone.
    const mine = await student.agent.get('/api/me/calendar-feed').expect(200)
    expect(mine.body.active).toBe(true)
    const theirs = await outsider.agent.get('/api/me/calendar-feed').expect(200)
    expect(theirs.body.active).toBe(false)
  })

  it('needs the CSRF header to make or turn off a feed', async () => {
    const student = await signedInAs(ctx, fx.student.email)
    const url = await makeFeed(student)
    const post = await student.agent.post('/api/me/calendar-feed')
    expect(post.status).toBe(403)
    expect(post.body.error.code).toBe('csrf_failed')
    const del = await student.agent.delete('/api/me/calendar-feed')
    expect(del.status).toBe(403)
    expect(del.body.error.code).toBe('csrf_failed')
    // Neither refused call changed anything: the address still works.
    await fetchFeed(url).expect(200)
  })
})

describe('stand sessions in the feed', () => {
  // A fixture of its own, so the due-date checks above keep their exact lists.
  let fs: Fixture
  let code = ''
  const at = (iso: string) => new Date(iso)
  const slot: Record<'a1' | 'a2' | 'a3' | 'aCancelled' | 'b1', number> = { a1: 0, a2: 0, a3: 0, aCancelled: 0, b1: 0 }
  let heldA1 = 0
  let sheetTitle = ''

  const standEvents = (events: ParsedEvent[]) => events.filter((e) => e.uid.startsWith('stand-'))
  async function feedTextOf(email: string): Promise<string> {
    const c = await signedInAs(ctx, email)
    return (await fetchFeed(await makeFeed(c)).expect(200)).text
  }
  const feedOf = async (email: string) => parseFeed(await feedTextOf(email))

  beforeAll(async () => {
    fs = await seedFixture(ctx)
    const db = ctx.handle.db
    await db.update(courses).set({ timeZone: 'America/Denver' }).where(eq(courses.id, fs.courseId))
    const [row] = await db.select({ code: courses.code }).from(courses).where(eq(courses.id, fs.courseId))
    code = row!.code
    const inst = await signedInAs(ctx, fs.instructor.email)
    sheetTitle = 'Cold flow on the stand'
    const sheet = await createModuleAs(inst, fs.courseId, moduleSource(sheetTitle))
    await publishAs(inst, fs.courseId, sheet)
    const [g1] = await db
      .select({ id: labGroups.id })
      .from(labGroups)
      .where(and(eq(labGroups.courseId, fs.courseId), eq(labGroups.name, 'G1')))
    // The second student's group, in section B.
    const g2 = await insertLabGroup(db, fs.courseId, fs.sectionB, 'G2')
    await db
      .update(enrollments)
      .set({ labGroupId: g2 })
      .where(and(eq(enrollments.userId, fs.student2.id), eq(enrollments.courseId, fs.courseId)))
    const standId = await insertStand(db, fs.courseId, 'Stand Q', 'Bay 9')
    const A = { standId, sectionId: fs.sectionA }
    // 13:00 MST on Tuesday 2 March 2027, then every half hour.
    slot.a1 = await insertSlot(db, { ...A, startsAt: at('2027-03-02T20:00:00Z') })
    slot.a2 = await insertSlot(db, { ...A, startsAt: at('2027-03-02T20:30:00Z') })
    slot.a3 = await insertSlot(db, { ...A, startsAt: at('2027-03-02T21:00:00Z') })
    slot.aCancelled = await insertSlot(db, { ...A, startsAt: at('2027-03-02T21:30:00Z'), cancelled: true })
    slot.b1 = await insertSlot(db, { standId, sectionId: fs.sectionB, startsAt: at('2027-03-04T16:00:00Z') })
    const book = (slotId: number, labGroupId: number) => insertBooking(db, { slotId, labGroupId, moduleId: sheet.id })
    heldA1 = await book(slot.a1, g1!.id)
    await cancelBooking(db, await book(slot.a2, g1!.id))
    await book(slot.aCancelled, g1!.id)
    await book(slot.b1, g2)
  })

  it('gives a student their own group’s active bookings as spans with stand, place and sheet', async () => {
    const text = await feedTextOf(fs.student.email)
    const mine = standEvents(parseFeed(text))
    expect(mine).toHaveLength(1)
    // Written as UTC instants, not floating local times.
    expect(text).toContain('DTSTART:20270302T200000Z')
    expect(text).toContain('DTEND:20270302T203000Z')
    const [e] = mine
    expect(e!.uid).toBe(`stand-booking-${heldA1}-${fs.student.id}@isentrope`)
    expect(e!.summary).toBe(`${code}: ${sheetTitle} at Stand Q`)
    expect(e!.location).toBe('Stand Q, Bay 9')
    expect(e!.start).toBe(Date.parse('2027-03-02T20:00:00Z'))
    expect(e!.end).toBe(Date.parse('2027-03-02T20:30:00Z'))
    expect(e!.description).toContain('13:00–13:30')
    expect(e!.description).toContain('America/Denver')
    expect(e!.url).toBe(`${ctx.config.APP_URL.replace(/\/$/, '')}/c/${fs.courseSlug}/stand-time`)

    // The other section's student sees only their own group's booking.
    const theirs = standEvents(await feedOf(fs.student2.email))
    expect(theirs.map((t) => t.start)).toEqual([Date.parse('2027-03-04T16:00:00Z')])
  })

  it('gives a TA one event per open slot of their section, with who booked it', async () => {
    const events = standEvents(await feedOf(fs.ta.email))
    expect(events.map((e) => e.uid).sort()).toEqual(
      [slot.a1, slot.a2, slot.a3].map((id) => `stand-slot-${id}-${fs.ta.id}@isentrope`).sort(),
    )
    const a1 = events.find((e) => e.uid.startsWith(`stand-slot-${slot.a1}-`))!
    expect(a1.summary).toBe(`${code} A: Stand Q, G1 (${sheetTitle})`)
    expect(a1.end! - a1.start).toBe(30 * 60_000)
    // The cancelled booking frees its slot; the cancelled slot is gone.
    const a2 = events.find((e) => e.uid.startsWith(`stand-slot-${slot.a2}-`))!
    expect(a2.summary).toBe(`${code} A: Stand Q, not booked`)
  })

  it('gives the instructor every open slot of the course', async () => {
    const events = standEvents(await feedOf(fs.instructor.email))
    expect(events.map((e) => e.uid).sort()).toEqual(
      [slot.a1, slot.a2, slot.a3, slot.b1].map((id) => `stand-slot-${id}-${fs.instructor.id}@isentrope`).sort(),
    )
    const b1 = events.find((e) => e.uid.startsWith(`stand-slot-${slot.b1}-`))!
    expect(b1.summary).toBe(`${code} B: Stand Q, G2 (${sheetTitle})`)
  })

  it('drops a booking once it is cancelled, and the TA’s event for the slot keeps its UID', async () => {
    const before = standEvents(await feedOf(fs.ta.email)).find((e) => e.uid.startsWith(`stand-slot-${slot.a1}-`))!
    await cancelBooking(ctx.handle.db, heldA1)
    expect(standEvents(await feedOf(fs.student.email))).toEqual([])
    const after = standEvents(await feedOf(fs.ta.email)).find((e) => e.uid.startsWith(`stand-slot-${slot.a1}-`))!
    expect(after.uid).toBe(before.uid)
    expect(after.summary).toBe(`${code} A: Stand Q, not booked`)
  })
})
