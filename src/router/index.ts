import { createRouter, createWebHistory, type RouteRecordRaw } from 'vue-router'
import { ADMIN, EDITORS, STAFF, type Role } from '@shared/constants'
import { useSessionStore } from '@/stores/session'

declare module 'vue-router' {
  interface RouteMeta {
    /** Who may open the page; absent = anyone, even signed out. */
    roles?: readonly Role[]
    /** Label in the navigation; absent = not listed. */
    nav?: string
    navGroup?: 'work' | 'admin'
    title?: string
  }
}

export const routes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { title: 'Sign in' },
  },
  {
    path: '/forgot-password',
    name: 'forgot-password',
    component: () => import('@/views/ForgotPasswordView.vue'),
    meta: { title: 'Forgot password' },
  },
  {
    path: '/set-password',
    name: 'set-password',
    component: () => import('@/views/SetPasswordView.vue'),
    meta: { title: 'Choose a password' },
  },
  {
    // Players arrive from an invitation link with no sign-in: outside the staff shell.
    path: '/p/:token',
    name: 'player',
    component: () => import('@/views/PlayerView.vue'),
    meta: { title: 'Your invitation' },
  },
  {
    path: '/',
    component: () => import('@/components/AppShell.vue'),
    children: [
      {
        path: '',
        name: 'home',
        component: () => import('@/views/HomeView.vue'),
        meta: { roles: STAFF, nav: 'Overview', navGroup: 'work', title: 'Overview' },
      },
      {
        path: 'recipes',
        name: 'recipes',
        component: () => import('@/views/RecipesView.vue'),
        meta: { roles: STAFF, nav: 'Recipes', navGroup: 'work', title: 'Recipes' },
      },
      {
        path: 'clips',
        name: 'clips',
        component: () => import('@/views/ClipsView.vue'),
        meta: {
          roles: STAFF,
          nav: 'Clips',
          navGroup: 'work',
          title: 'Clips',
        },
      },
      {
        path: 'sessions',
        name: 'sessions',
        component: () => import('@/views/SessionsView.vue'),
        meta: { roles: STAFF, nav: 'Sessions', navGroup: 'work', title: 'Sessions' },
      },
      {
        path: 'sessions/new',
        name: 'session-new',
        component: () => import('@/views/SessionNewView.vue'),
        meta: { roles: EDITORS, title: 'New session' },
      },
      {
        path: 'sessions/:id(\\d+)',
        name: 'session',
        component: () => import('@/views/SessionView.vue'),
        meta: { roles: STAFF, title: 'Session' },
      },
      {
        path: 'sessions/:id(\\d+)/findings',
        name: 'findings',
        component: () => import('@/views/FindingsView.vue'),
        meta: { roles: STAFF, title: 'Findings' },
      },
      {
        path: 'panel',
        name: 'panel',
        component: () => import('@/views/PanelView.vue'),
        meta: { roles: EDITORS, nav: 'Panel', navGroup: 'work', title: 'Panel' },
      },
      {
        path: 'admin/staff',
        name: 'staff',
        component: () => import('@/views/StaffView.vue'),
        meta: { roles: ADMIN, nav: 'Staff accounts', navGroup: 'admin', title: 'Staff' },
      },
      {
        path: 'admin/audit',
        name: 'audit',
        component: () => import('@/views/AuditView.vue'),
        meta: { roles: ADMIN, nav: 'Audit log', navGroup: 'admin', title: 'Audit log' },
      },
      {
        path: 'admin/mail',
        name: 'mail',
        component: () => import('@/views/MailView.vue'),
        meta: { roles: ADMIN, nav: 'Mail', navGroup: 'admin', title: 'Mail' },
      },
      {
        // Reached from the user menu in the app shell, not from the navigation.
        path: 'account',
        name: 'account',
        component: () => import('@/views/AccountView.vue'),
        meta: { roles: STAFF, title: 'Your account' },
      },
      {
        path: 'no-access',
        name: 'no-access',
        component: () => import('@/views/NoAccessView.vue'),
        meta: { roles: STAFF, title: 'No access' },
      },
      {
        path: ':pathMatch(.*)*',
        name: 'not-found',
        component: () => import('@/views/NotFoundView.vue'),
        meta: { roles: STAFF, title: 'Not found' },
      },
    ],
  },
]

export function createRingdownRouter() {
  const router = createRouter({ history: createWebHistory(), routes })

  // For the user's sake only: the server checks every request on its own.
  router.beforeEach(async (to) => {
    const session = useSessionStore()
    await session.load()
    if (to.meta.roles && !session.user) {
      return { name: 'sign-in', query: to.fullPath === '/' ? {} : { next: to.fullPath } }
    }
    if (to.meta.roles && !session.can(to.meta.roles)) {
      return { name: 'no-access', query: { from: to.fullPath } }
    }
    if (to.name === 'sign-in' && session.user) return { name: 'home' }
  })
  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Ringdown` : 'Ringdown'
  })
  return router
}
