import { mount } from '@vue/test-utils'
import type { Component } from 'vue'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from './mount-with-app'

/** Mounts a presentational component with Vuetify only (no router, no store, no server). */
export function mountWithVuetify<P extends Record<string, unknown>>(component: Component, props: P) {
  stubMissingBrowserApis()
  return mount(component, {
    props,
    global: { plugins: [createNestwiseVuetify()] },
    attachTo: document.body,
  })
}
