import { createPinia, setActivePinia } from 'pinia'
import { beforeEach, describe, expect, it, vi } from 'vitest'
import type { CourseSummary } from '../../../shared/schemas/courses'

// "My courses" as the server would answer it; each test sets what the server holds.
let serverCourses: (Pick<CourseSummary, 'id' | 'role'> & Partial<Pick<CourseSummary, 'timeZone'>>)[] = []
const fetchMyCourses = vi.fn(async () => serverCourses.map((c) => ({ ...c }) as CourseSummary))
vi.mock('@/api/courses', () => ({ fetchMyCourses: () => fetchMyCourses() }))

const { useCourseRolesStore } = await import('../../../src/stores/course-roles')
const { useSessionStore } = await import('../../../src/stores/session')

const settle = () => new Promise((r) => setTimeout(r, 0))

function signedInAs(id: number) {
  const session = useSessionStore()
  session.user = { id, email: `p${id}@test.example`, displayName: `Person ${id}`, isSiteAdmin: false }
}

describe('the shared course roles', () => {
  beforeEach(() => {
    setActivePinia(createPinia())
    fetchMyCourses.mockClear()
  })

  it('reads "my courses" once and answers every course from it', async () => {
    serverCourses = [
      { id: 1, role: 'student' },
      { id: 2, role: 'ta' },
    ]
    signedInAs(10)
    const roles = useCourseRolesStore()
    expect(roles.roleIn(1)).toBeNull()
    await settle()
    expect(roles.roleIn(1)).toBe('student')
    expect(roles.roleIn(2)).toBe('ta')
    expect(fetchMyCourses).toHaveBeenCalledTimes(1)
  })

  it("answers each course's time zone from the same list, without another request", async () => {
    serverCourses = [
      { id: 1, role: 'student', timeZone: 'America/Denver' },
      { id: 2, role: 'ta', timeZone: 'Europe/Oslo' },
    ]
    signedInAs(12)
    const roles = useCourseRolesStore()
    expect(roles.timeZoneIn(1)).toBeNull()
    await settle()
    expect(roles.timeZoneIn(1)).toBe('America/Denver')
    expect(roles.timeZoneIn(2)).toBe('Europe/Oslo')
    expect(roles.roleIn(2)).toBe('ta')
    expect(fetchMyCourses).toHaveBeenCalledTimes(1)
  })

  it('looks a course missing from the list up once more (an enrollment made since), and only once', async () => {
    serverCourses = [{ id: 1, role: 'student' }]
    signedInAs(11)
    const roles = useCourseRolesStore()
    roles.roleIn(1)
    await settle()
    serverCourses = [
      { id: 1, role: 'student' },
      { id: 3, role: 'instructor' },
    ]
    expect(roles.roleIn(3)).toBeNull()
    await settle()
    expect(roles.roleIn(3)).toBe('instructor')
    expect(roles.roleIn(4)).toBeNull()
    await settle()
    expect(roles.roleIn(4)).toBeNull()
    await settle()
    // The first read, one re-read for course 3, one for course 4; none more for course 4.
    expect(fetchMyCourses).toHaveBeenCalledTimes(3)
  })

  it('forgets the roles when someone else signs in', async () => {
    serverCourses = [{ id: 1, role: 'instructor' }]
    signedInAs(12)
    const roles = useCourseRolesStore()
    roles.roleIn(1)
    await settle()
    expect(roles.roleIn(1)).toBe('instructor')
    serverCourses = [{ id: 1, role: 'student' }]
    signedInAs(13)
    await settle()
    expect(roles.roleIn(1)).toBeNull()
    await settle()
    expect(roles.roleIn(1)).toBe('student')
  })
})
