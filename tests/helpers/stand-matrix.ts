import { and, eq } from 'drizzle-orm'
import { bookingWaitlist, bookings, labGroups, standModules, standSlots, stands } from '../../server/db/schema'
import type { Client, Fixture, TestContext } from './app'
import { signedInAs, uniq } from './app'
import { issuedStandSheet } from './stands'

/**
 * The stand and booking rows of the authorization matrix (tests/api/authorization.test.ts). Every
 * success works on rows made for that one call (a fresh slot, a fresh booking), so the callers that
 * follow meet the same situation and the fixture course keeps its head counts.
 */
type Who = 'anon' | 'outsider' | 'student' | 'ta' | 'instructor' | 'admin'
interface Case {
  route: string
  call: (c: Client, fx: Fixture) => Promise<{ status: number }>
  expect: Record<Who, number>
}

interface StandFixture {
  standId: number
  moduleId: number
  groupG1: number
  /** Another group of section A, to hold slots the fixture student's group waits for. */
  otherGroup: number
}

const MEMBERS_READ = { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 }
const STAFF_ONLY = (ok: number) => ({ anon: 401, outsider: 404, student: 403, ta: ok, instructor: ok, admin: 404 })
const INSTRUCTOR_ONLY = (ok: number) => ({
  anon: 401,
  outsider: 404,
  student: 403,
  ta: 403,
  instructor: ok,
  admin: 404,
})
const STUDENT_ONLY = (ok: number) => ({ anon: 401, outsider: 404, student: ok, ta: 403, instructor: 403, admin: 404 })

export function standCases(getCtx: () => TestContext): Case[] {
  let made: Promise<StandFixture> | null = null
  let hour = 0
  let day = 10
  const C = (fx: Fixture) => `/api/courses/${fx.courseId}`

  const standFx = (fx: Fixture): Promise<StandFixture> => {
    made ??= (async () => {
      const ctx = getCtx()
      const db = ctx.handle.db
      const inst = await signedInAs(ctx, fx.instructor.email)
      const sheet = await issuedStandSheet(inst, fx.courseId, 'Matrix stand runs', 20)
      const [stand] = await db.insert(stands).values({ courseId: fx.courseId, name: `Matrix stand` }).$returningId()
      await db.insert(standModules).values({ standId: stand!.id, moduleId: sheet.id })
      const [g1] = await db
        .select({ id: labGroups.id })
        .from(labGroups)
        .where(and(eq(labGroups.courseId, fx.courseId), eq(labGroups.name, 'G1')))
      const [other] = await db
        .insert(labGroups)
        .values({ courseId: fx.courseId, sectionId: fx.sectionA, name: `Matrix holders ${uniq()}` })
        .$returningId()
      return { standId: stand!.id, moduleId: sheet.id, groupG1: g1!.id, otherGroup: other!.id }
    })()
    return made
  }

  /** A fresh section-A slot far ahead, one hour after the last one made. */
  const freshSlot = async (fx: Fixture): Promise<number> => {
    const s = await standFx(fx)
    const startsAt = new Date(Date.UTC(2031, 0, 6, 8) + hour++ * 3_600_000)
    const [row] = await getCtx()
      .handle.db.insert(standSlots)
      .values({ standId: s.standId, sectionId: fx.sectionA, startsAt, minutes: 30 })
      .$returningId()
    return row!.id
  }
  const bookedSlot = async (fx: Fixture, groupId: number): Promise<{ slotId: number; bookingId: number }> => {
    const s = await standFx(fx)
    const slotId = await freshSlot(fx)
    const [b] = await getCtx()
      .handle.db.insert(bookings)
      .values({ slotId, labGroupId: groupId, moduleId: s.moduleId })
      .$returningId()
    return { slotId, bookingId: b!.id }
  }

  return [
    {
      route: 'GET /api/courses/:courseId/stands',
      call: (c, fx) => c.agent.get(`${C(fx)}/stands`),
      expect: STAFF_ONLY(200),
    },
    {
      route: 'POST /api/courses/:courseId/stands',
      call: (c, fx) =>
        c.agent
          .post(`${C(fx)}/stands`)
          .set('x-csrf-token', c.csrf)
          .send({ name: `Stand ${uniq()}` }),
      expect: INSTRUCTOR_ONLY(201),
    },
    {
      route: 'PATCH /api/courses/:courseId/stands/:standId',
      call: async (c, fx) => {
        const s = await standFx(fx)
        return c.agent
          .patch(`${C(fx)}/stands/${s.standId}`)
          .set('x-csrf-token', c.csrf)
          .send({ location: 'Matrix bay' })
      },
      expect: INSTRUCTOR_ONLY(200),
    },
    {
      route: 'POST /api/courses/:courseId/stands/:standId/slots',
      call: async (c, fx) => {
        const s = await standFx(fx)
        return c.agent
          .post(`${C(fx)}/stands/${s.standId}/slots`)
          .set('x-csrf-token', c.csrf)
          .send({ kind: 'one', sectionId: fx.sectionA, date: `2032-03-${day++}`, start: '09:00', minutes: 30 })
      },
      expect: STAFF_ONLY(201),
    },
    {
      route: 'DELETE /api/courses/:courseId/slots/:slotId',
      call: async (c, fx) => {
        const slotId = await freshSlot(fx)
        return c.agent
          .delete(`${C(fx)}/slots/${slotId}`)
          .set('x-csrf-token', c.csrf)
          .send({ reason: 'Matrix closure' })
      },
      expect: STAFF_ONLY(200),
    },
    {
      route: 'GET /api/courses/:courseId/slots',
      call: (c, fx) => c.agent.get(`${C(fx)}/slots?from=2031-01-01&to=2031-12-31`),
      expect: MEMBERS_READ,
    },
    {
      route: 'POST /api/courses/:courseId/slots/:slotId/bookings',
      call: async (c, fx) => {
        const s = await standFx(fx)
        const slotId = await freshSlot(fx)
        return c.agent
          .post(`${C(fx)}/slots/${slotId}/bookings`)
          .set('x-csrf-token', c.csrf)
          .send({ moduleId: s.moduleId })
      },
      expect: STUDENT_ONLY(201),
    },
    {
      route: 'POST /api/courses/:courseId/slots/:slotId/waitlist',
      call: async (c, fx) => {
        const s = await standFx(fx)
        const { slotId } = await bookedSlot(fx, s.otherGroup)
        return c.agent
          .post(`${C(fx)}/slots/${slotId}/waitlist`)
          .set('x-csrf-token', c.csrf)
          .send({ moduleId: s.moduleId })
      },
      expect: STUDENT_ONLY(201),
    },
    {
      route: 'DELETE /api/courses/:courseId/slots/:slotId/waitlist',
      call: async (c, fx) => {
        const s = await standFx(fx)
        const { slotId } = await bookedSlot(fx, s.otherGroup)
        await getCtx().handle.db.insert(bookingWaitlist).values({ slotId, labGroupId: s.groupG1, moduleId: s.moduleId })
        return c.agent.delete(`${C(fx)}/slots/${slotId}/waitlist`).set('x-csrf-token', c.csrf)
      },
      expect: STUDENT_ONLY(204),
    },
    {
      route: 'GET /api/courses/:courseId/bookings',
      call: (c, fx) => c.agent.get(`${C(fx)}/bookings`),
      expect: MEMBERS_READ,
    },
    {
      // The fixture student's group's booking: the student, the section's TA and the instructor cancel it.
      route: 'POST /api/courses/:courseId/bookings/:bookingId/cancel',
      call: async (c, fx) => {
        const s = await standFx(fx)
        const { bookingId } = await bookedSlot(fx, s.groupG1)
        return c.agent
          .post(`${C(fx)}/bookings/${bookingId}/cancel`)
          .set('x-csrf-token', c.csrf)
          .send({ reason: 'Matrix cancel' })
      },
      expect: { anon: 401, outsider: 404, student: 200, ta: 200, instructor: 200, admin: 404 },
    },
    {
      route: 'POST /api/courses/:courseId/bookings/:bookingId/move',
      call: async (c, fx) => {
        const s = await standFx(fx)
        const { bookingId } = await bookedSlot(fx, s.groupG1)
        const to = await freshSlot(fx)
        const res = await c.agent
          .post(`${C(fx)}/bookings/${bookingId}/move`)
          .set('x-csrf-token', c.csrf)
          .send({ slotId: to, reason: 'Matrix move' })
        // Leaves the group's runs as they were for the rows that follow.
        await getCtx()
          .handle.db.update(bookings)
          .set({ status: 'cancelled' })
          .where(and(eq(bookings.labGroupId, s.groupG1), eq(bookings.status, 'active')))
        return res
      },
      expect: STAFF_ONLY(200),
    },
    {
      route: 'PATCH /api/courses/:courseId/booking-settings',
      call: (c, fx) =>
        c.agent
          .patch(`${C(fx)}/booking-settings`)
          .set('x-csrf-token', c.csrf)
          .send({ cutoffHours: 24 }),
      expect: INSTRUCTOR_ONLY(200),
    },
  ]
}
