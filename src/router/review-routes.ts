import type { RouteRecordRaw } from 'vue-router'

/** The lab board, the reviewer's inbox and the page behind a read-only share link. */
export const reviewRoutes: RouteRecordRaw[] = [
  {
    path: '/lab/board',
    name: 'lab-board',
    component: () => import('@/views/LabBoardView.vue'),
    meta: { roles: ['pi'], title: 'Lab board' },
  },
  {
    path: '/reviews',
    name: 'reviews',
    component: () => import('@/views/ReviewsView.vue'),
    meta: { roles: ['biostatistician'], title: 'Reviews' },
  },
  {
    // Share links land here (/s/<token>): no account, no navigation, nothing but the one result.
    path: '/s/:token',
    name: 'shared-analysis',
    component: () => import('@/views/SharedAnalysisView.vue'),
    meta: { public: true, shell: false, title: 'Shared result' },
  },
]
