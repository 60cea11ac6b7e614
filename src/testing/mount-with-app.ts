import { mount, flushPromises } from '@vue/test-utils'
import { createPinia, setActivePinia } from 'pinia'
import { createMemoryHistory, type RouteRecordRaw } from 'vue-router'
import type { Component } from 'vue'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { createAppRouter } from '@/router'
import { routes } from '@/router/routes'

/**
 * happy-dom lacks ResizeObserver and visualViewport, which Vuetify layouts and menus use.
 * A null visualViewport takes Vuetify's own "not supported" branch.
 */
export function stubMissingBrowserApis(): void {
  globalThis.ResizeObserver ??= class {
    observe() {}
    unobserve() {}
    disconnect() {}
  } as unknown as typeof ResizeObserver
  if (!('visualViewport' in globalThis)) {
    Object.defineProperty(globalThis, 'visualViewport', { value: null, configurable: true })
  }
}

/**
 * Mounts a component with the real Pinia, router (memory history, real guards) and Vuetify,
 * so tests exercise the same wiring as the app. Components are attached to the document
 * because Vuetify menus and overlays teleport there.
 */
export async function mountWithApp(
  component: Component,
  options: {
    path?: string
    extraRoutes?: RouteRecordRaw[]
    /** Replaces the app's routes (to test a page as if some feature were absent). */
    routes?: RouteRecordRaw[]
    props?: Record<string, unknown>
    /** Components replaced by stubs (e.g. charts, which happy-dom cannot draw). */
    stubs?: Record<string, boolean>
  } = {},
) {
  stubMissingBrowserApis()
  const pinia = createPinia()
  setActivePinia(pinia)
  const router = createAppRouter(createMemoryHistory(), [
    ...(options.extraRoutes ?? []),
    ...(options.routes ?? routes),
  ])
  const vuetify = createNestwiseVuetify()
  await router.push(options.path ?? '/')
  await router.isReady()
  const wrapper = mount(component, {
    props: options.props,
    global: { plugins: [pinia, router, vuetify], stubs: options.stubs },
    attachTo: document.body,
  })
  await flushPromises()
  return { wrapper, router, pinia }
}
