import type { RouteRecordRaw } from 'vue-router'

/** The analysis workspace; its charts (echarts) load with these pages only. */
export const analysisRoutes: RouteRecordRaw[] = [
  {
    path: '/analyses',
    name: 'analyses',
    component: () => import('@/views/AnalysesView.vue'),
    meta: { title: 'Analyses' },
  },
  {
    path: '/analyses/new',
    name: 'analysis-new',
    component: () => import('@/views/AnalysisNewView.vue'),
    meta: { title: 'New analysis', roles: ['scientist', 'pi'] },
  },
  {
    path: '/analyses/:analysisId(\\d+)',
    name: 'analysis',
    component: () => import('@/views/AnalysisView.vue'),
    meta: { title: 'Analysis' },
  },
  {
    path: '/analyses/:analysisId(\\d+)/versions/:versionNo(\\d+)/print',
    name: 'analysis-print',
    component: () => import('@/views/AnalysisPrintView.vue'),
    meta: { title: 'Printable report', shell: false },
  },
]
