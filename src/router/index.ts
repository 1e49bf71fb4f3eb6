import { createRouter, createWebHistory } from 'vue-router'
import { useSessionStore } from '@/stores/session'

declare module 'vue-router' {
  interface RouteMeta {
    /** Reachable without signing in. */
    public?: boolean
    title?: string
  }
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
    {
      path: '/courses/:courseId(\\d+)',
      name: 'course-home',
      component: () => import('@/views/CourseHomeView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Course' },
    },
    {
      path: '/courses/:courseId(\\d+)/roster',
      name: 'course-roster',
      component: () => import('@/views/RosterView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Roster' },
    },
    {
      path: '/courses/:courseId(\\d+)/roster/import',
      name: 'roster-import',
      component: () => import('@/views/RosterImportView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Import roster' },
    },
    {
      path: '/courses/:courseId(\\d+)/sections',
      name: 'course-sections',
      component: () => import('@/views/SectionsView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Sections & groups' },
    },
    {
      path: '/courses/:courseId(\\d+)/review',
      name: 'review-queue',
      component: () => import('@/views/ReviewQueueView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Review queue' },
    },
    {
      path: '/courses/:courseId(\\d+)/review/:submissionId(\\d+)',
      name: 'review-submission',
      component: () => import('@/views/ReviewSubmissionView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId), submissionId: Number(r.params.submissionId) }),
      meta: { title: 'Review' },
    },
    {
      path: '/courses/:courseId(\\d+)/modules/:moduleId(\\d+)',
      name: 'module-read',
      component: () => import('@/views/ModuleReadView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId), moduleId: Number(r.params.moduleId) }),
      meta: { title: 'Module' },
    },
    {
      path: '/courses/:courseId(\\d+)/modules/:moduleId(\\d+)/edit',
      name: 'module-edit',
      component: () => import('@/views/ModuleEditorView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId), moduleId: Number(r.params.moduleId) }),
      meta: { title: 'Edit module' },
    },
    {
      path: '/courses/:courseId(\\d+)/modules/:moduleId(\\d+)/hand-in',
      name: 'hand-in',
      component: () => import('@/views/HandInView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId), moduleId: Number(r.params.moduleId) }),
      meta: { title: 'Hand in' },
    },
    {
      path: '/courses/:courseId(\\d+)/submissions/:submissionId(\\d+)',
      name: 'submission',
      component: () => import('@/views/SubmissionView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId), submissionId: Number(r.params.submissionId) }),
      meta: { title: 'Hand-in result' },
    },
    {
      path: '/courses/:courseId(\\d+)/gradebook',
      name: 'gradebook',
      component: () => import('@/views/GradebookView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'Gradebook' },
    },
    {
      path: '/courses/:courseId(\\d+)/grades',
      name: 'my-grades',
      component: () => import('@/views/MyGradesView.vue'),
      props: (r) => ({ courseId: Number(r.params.courseId) }),
      meta: { title: 'My grades' },
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
  return true
})

router.afterEach((to) => {
  document.title = to.meta.title ? `${to.meta.title} · Isentrope` : 'Isentrope'
})

export default router
