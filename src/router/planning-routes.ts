import type { RouteRecordRaw } from 'vue-router'

/** The experiment planner and the agreement-between-labs page. */
export const planningRoutes: RouteRecordRaw[] = [
  {
    path: '/planner',
    name: 'planner',
    component: () => import('@/views/PlannerView.vue'),
    meta: { title: 'Plan an experiment' },
  },
  {
    path: '/plans/:planId(\\d+)',
    name: 'plan',
    component: () => import('@/views/PlannerView.vue'),
    meta: { title: 'Plan an experiment' },
  },
  {
    path: '/analyses/:analysisId(\\d+)/versions/:versionNo(\\d+)/agreement',
    name: 'agreement',
    component: () => import('@/views/AgreementView.vue'),
    meta: { title: 'Agreement between labs' },
  },
]
