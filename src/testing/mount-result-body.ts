import { mount } from '@vue/test-utils'
import ResultBody from '@/components/analysis/ResultBody.vue'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from './mount-with-app'

/**
 * Mounts the result body with Vuetify and the chart stubbed (happy-dom draws no canvas). Any Vue
 * warning or render error is pushed to `problems`, so a test of "renders without errors" can
 * expect none.
 */
export function mountResultBody(props: InstanceType<typeof ResultBody>['$props'], problems: string[]) {
  stubMissingBrowserApis()
  return mount(ResultBody, {
    props,
    global: {
      plugins: [createNestwiseVuetify()],
      stubs: { AnalysisChart: true },
      config: {
        warnHandler: (message) => void problems.push(message),
        errorHandler: (error) => void problems.push(String(error)),
      },
    },
    attachTo: document.body,
  })
}
