import { createRouter, createWebHistory, type RouteRecordRaw, type RouterHistory } from 'vue-router'
import { useSessionStore } from '@/stores/session'
import { decideAccess, safeRedirect } from './access'
import { routes } from './routes'

export function createAppRouter(
  history: RouterHistory = createWebHistory(),
  routeRecords: RouteRecordRaw[] = routes,
) {
  const router = createRouter({ history, routes: routeRecords })

  router.beforeEach(async (to) => {
    const session = useSessionStore()
    await session.ensureLoaded()

    if (to.name === 'sign-in' && session.isSignedIn) {
      return safeRedirect(to.query.redirect)
    }

    switch (decideAccess(to.meta, session.user)) {
      case 'allow':
        return true
      case 'sign-in':
        return {
          name: 'sign-in',
          query: to.fullPath === '/' ? {} : { redirect: to.fullPath },
        }
      case 'not-available':
        return { name: 'not-available', query: { page: to.fullPath } }
    }
  })

  router.afterEach((to) => {
    document.title = to.meta.title ? `${to.meta.title} · Nestwise` : 'Nestwise'
  })

  return router
}
