import type { RouteRecordRaw } from 'vue-router'

// Views load on demand so the first page only downloads what it shows.
export const routes: RouteRecordRaw[] = [
  {
    path: '/sign-in',
    name: 'sign-in',
    component: () => import('@/views/SignInView.vue'),
    meta: { public: true, shell: false, title: 'Sign in' },
  },
  {
    path: '/',
    name: 'overview',
    component: () => import('@/views/OverviewView.vue'),
    meta: { title: 'Overview' },
  },
  {
    path: '/not-available',
    name: 'not-available',
    component: () => import('@/views/NotAvailableView.vue'),
    meta: { title: 'Not available for your role' },
  },
  {
    path: '/:pathMatch(.*)*',
    name: 'not-found',
    component: () => import('@/views/NotFoundView.vue'),
    meta: { public: true, title: 'Page not found' },
  },
]
