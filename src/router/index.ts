import { createRouter, createWebHistory, type RouteLocationNormalized, type RouteLocationRaw } from 'vue-router'
import { ApiError } from '@/api/http'
import { useCourseKeysStore } from '@/stores/course-keys'
import { useSessionStore } from '@/stores/session'

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable without signing in. */
    public?: boolean
    title?: string
  }
}

const param = (r: RouteLocationNormalized, name: string): string => {
  const v = r.params[name]
  return Array.isArray(v) ? v.join('/') : (v ?? '')
}
// 0 only when the keys could not be read (server unreachable): the view then reports the error.
const courseIdOf = (r: RouteLocationNormalized): number => useCourseKeysStore().courseId(param(r, 'course')) ?? 0
const sheetIdOf = (r: RouteLocationNormalized): number =>
  useCourseKeysStore().sheetId(param(r, 'course'), param(r, 'sheet')) ?? 0

/** Where an old numeric address (`/courses/3/modules/5/edit`) now lives, or null if unknown. */
async function oldAddress(to: RouteLocationNormalized): Promise<RouteLocationRaw | null> {
  const keys = useCourseKeysStore()
  const rest = param(to, 'rest').split('/').filter(Boolean)
  const sheetMatch = rest[0] === 'modules' && /^\d+$/.test(rest[1] ?? '') ? Number(rest[1]) : undefined
  const k = await keys.byCourseId(Number(to.params.courseId), sheetMatch !== undefined ? { id: sheetMatch } : undefined)
  const course = k.slug
  const keep = { query: to.query, hash: to.hash }
  const path = rest.join('/')
  const plain: Record<string, string> = {
    '': 'course-home',
    roster: 'course-roster',
    'roster/import': 'roster-import',
    sections: 'course-sections',
    'next-term': 'course-rollover',
    review: 'review-queue',
    gradebook: 'marks',
    grades: 'my-marks',
    stands: 'stands',
    'stand-time': 'stand-time',
  }
  const name = plain[path]
  if (name) return { name, params: { course }, ...keep }
  const numbered = /^(review|submissions)\/(\d+)$/.exec(path)
  if (numbered) {
    const target = numbered[1] === 'review' ? 'review-submission' : 'hand-in-result'
    return { name: target, params: { course, submissionId: numbered[2]! }, ...keep }
  }
  const sheet = sheetMatch !== undefined ? k.sheets.find((s) => s.id === sheetMatch) : undefined
  const tail: Record<string, string> = { '': 'sheet', edit: 'sheet-edit', 'hand-in': 'hand-in' }
  const sheetName = tail[rest.slice(2).join('/')]
  if (sheet && sheetName) return { name: sheetName, params: { course, sheet: sheet.slug }, ...keep }
  return null
}

// Named, lazily loaded routes: each view is its own chunk.
const router = createRouter({
  history: createWebHistory(),
  routes: [
    { path: '/', redirect: { name: 'courses' } },
    {
      path: '/sign-in',
      name: 'sign-in',
      component: () => import('@/views/SignInView.vue'),
      meta: { public: true, title: 'Sign in' },
    },
    {
      path: '/invitations/:token',
      name: 'invitation',
      component: () => import('@/views/InvitationView.vue'),
      props: (r) => ({ token: String(r.params.token) }),
      meta: { public: true, title: 'Choose your password' },
    },
    {
      path: '/courses',
      name: 'courses',
      component: () => import('@/views/CoursesView.vue'),
      meta: { title: 'My courses' },
    },
    // A course's pages: /c/<course slug>/…, lab sheets by their own slug. The guard below turns the
    // slugs into the numeric ids the views and the API use (see stores/course-keys.ts).
    {
      path: '/c/:course',
      name: 'course-home',
      component: () => import('@/views/CourseHomeView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Course' },
    },
    {
      path: '/c/:course/roster',
      name: 'course-roster',
      component: () => import('@/views/RosterView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Roster' },
    },
    {
      path: '/c/:course/roster/import',
      name: 'roster-import',
      component: () => import('@/views/RosterImportView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Import roster' },
    },
    {
      path: '/c/:course/sections',
      name: 'course-sections',
      component: () => import('@/views/SectionsView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Sections & groups' },
    },
    {
      path: '/c/:course/next-term',
      name: 'course-rollover',
      component: () => import('@/views/CourseRolloverView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Start next term' },
    },
    {
      path: '/c/:course/stands',
      name: 'stands',
      component: () => import('@/views/StandsView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Stands' },
    },
    {
      path: '/c/:course/stand-time',
      name: 'stand-time',
      component: () => import('@/views/StandTimeView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Stand time' },
    },
    {
      path: '/c/:course/review',
      name: 'review-queue',
      component: () => import('@/views/ReviewQueueView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Review queue' },
    },
    {
      path: '/c/:course/review/:submissionId(\\d+)',
      name: 'review-submission',
      component: () => import('@/views/ReviewSubmissionView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), submissionId: Number(r.params.submissionId) }),
      meta: { title: 'Review' },
    },
    {
      path: '/c/:course/stand-time/:bookingId(\\d+)',
      name: 'stand-run',
      component: () => import('@/views/StandRunView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), bookingId: Number(r.params.bookingId) }),
      meta: { title: 'Run at the stand' },
    },
    {
      path: '/c/:course/sheets/:sheet',
      name: 'sheet',
      component: () => import('@/views/ModuleReadView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), moduleId: sheetIdOf(r) }),
      meta: { title: 'Lab sheet' },
    },
    {
      path: '/c/:course/sheets/:sheet/edit',
      name: 'sheet-edit',
      component: () => import('@/views/ModuleEditorView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), moduleId: sheetIdOf(r) }),
      meta: { title: 'Edit lab sheet' },
    },
    {
      path: '/c/:course/sheets/:sheet/hand-in',
      name: 'hand-in',
      component: () => import('@/views/HandInView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), moduleId: sheetIdOf(r) }),
      meta: { title: 'Hand in' },
    },
    {
      path: '/c/:course/hand-ins/:submissionId(\\d+)',
      name: 'hand-in-result',
      component: () => import('@/views/SubmissionView.vue'),
      props: (r) => ({ courseId: courseIdOf(r), submissionId: Number(r.params.submissionId) }),
      meta: { title: 'Hand-in result' },
    },
    {
      path: '/c/:course/marks',
      name: 'marks',
      component: () => import('@/views/GradebookView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'Marks' },
    },
    {
      path: '/c/:course/my-marks',
      name: 'my-marks',
      component: () => import('@/views/MyGradesView.vue'),
      props: (r) => ({ courseId: courseIdOf(r) }),
      meta: { title: 'My marks' },
    },
    // Numeric addresses from before the slugs (old e-mails, bookmarks): the guard redirects them.
    {
      path: '/courses/:courseId(\\d+)/:rest(.*)*',
      name: 'old-course-address',
      component: () => import('@/views/NotFoundView.vue'),
      meta: { title: 'Not found' },
    },
    {
      path: '/calculators',
      name: 'calculators',
      component: () => import('@/views/CalculatorsView.vue'),
      meta: { title: 'Calculators' },
    },
    {
      path: '/:pathMatch(.*)*',
      name: 'not-found',
      component: () => import('@/views/NotFoundView.vue'),
      meta: { public: true, title: 'Not found' },
    },
  ],
})

// The server enforces access on every API call; this guard only keeps signed-out people on the
// sign-in page and sends them back where they were going afterwards.
router.beforeEach(async (to) => {
  const session = useSessionStore()
  try {
    await session.ensureLoaded()
  } catch {
    // Server unreachable: let the view render; App shows the connection problem.
    return true
  }
  if (!to.meta.public && !session.signedIn) {
    return { name: 'sign-in', query: to.fullPath !== '/' ? { next: to.fullPath } : {} }
  }
  if (to.name === 'sign-in' && session.signedIn) return { name: 'courses' }
  try {
    if (to.name === 'old-course-address') return (await oldAddress(to)) ?? true
    if (typeof to.params.course === 'string') {
      const sheet = typeof to.params.sheet === 'string' ? { slug: to.params.sheet } : undefined
      const keys = await useCourseKeysStore().bySlug(to.params.course, sheet)
      if (sheet && !keys.sheets.some((s) => s.slug === sheet.slug)) return notFound(to)
    }
  } catch (err) {
    // A course or sheet this person cannot open is "not found", as the API says.
    if (err instanceof ApiError && (err.status === 404 || err.status === 400)) return notFound(to)
    // Otherwise (server unreachable) let the view render and report the problem.
  }
  return true
})

function notFound(to: RouteLocationNormalized): RouteLocationRaw {
  return {
    name: 'not-found',
    params: { pathMatch: to.path.slice(1).split('/') },
    query: to.query,
    hash: to.hash,
    replace: true,
  }
}

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Isentrope` : 'Isentrope'
})

export default router
