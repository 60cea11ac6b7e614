import type { RouteRecordRaw } from 'vue-router'
import { analysisRoutes } from './analysis-routes'
import { planningRoutes } from './planning-routes'
import { reviewRoutes } from './review-routes'
import { teamRoutes } from './team-routes'

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
    path: '/datasets',
    name: 'datasets',
    component: () => import('@/views/DatasetsView.vue'),
    meta: { title: 'Datasets' },
  },
  {
    // Open to every member: the page itself explains that uploading needs the scientist or PI role.
    path: '/datasets/upload',
    name: 'dataset-upload',
    component: () => import('@/views/DatasetUploadView.vue'),
    meta: { title: 'Upload a table' },
  },
  {
    path: '/datasets/deleted',
    name: 'datasets-deleted',
    component: () => import('@/views/DeletedDatasetsView.vue'),
    meta: { title: 'Deleted datasets', admin: true },
  },
  {
    path: '/datasets/:datasetId(\\d+)',
    name: 'dataset',
    component: () => import('@/views/DatasetDetailView.vue'),
    meta: { title: 'Dataset' },
  },
  ...analysisRoutes,
  ...teamRoutes,
  ...planningRoutes,
  ...reviewRoutes,
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
