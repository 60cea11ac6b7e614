// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { h } from 'vue'
import { createMemoryHistory, createRouter } from 'vue-router'
import { afterEach, describe, expect, it } from 'vitest'
import { ApiError } from '@/api/http'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { stubMissingBrowserApis } from '@/testing/mount-with-app'
import RecordPage from './RecordPage.vue'

afterEach(() => {
  document.body.innerHTML = ''
})

const page = { render: () => h('p', 'page') }

async function mountPage(props: Partial<InstanceType<typeof RecordPage>['$props']> = {}) {
  stubMissingBrowserApis()
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [
      { path: '/', component: page },
      { path: '/datasets', name: 'datasets', component: page },
    ],
  })
  await router.push('/')
  await router.isReady()
  return mount(RecordPage, {
    props: {
      noun: 'dataset',
      notFoundIcon: 'mdi-table-question',
      listRoute: 'datasets',
      listTitle: 'Datasets',
      error: null,
      loading: false,
      loaded: true,
      ...props,
    },
    slots: {
      default: () => h('h1', { 'data-testid': 'record' }, 'Neurite lengths, cohort 3'),
      'not-found': () => 'It may have been deleted.',
    },
    global: { plugins: [router, createNestwiseVuetify()] },
    attachTo: document.body,
  })
}

describe('RecordPage', () => {
  it('shows the record under a link back to its list', async () => {
    const wrapper = await mountPage()
    expect(wrapper.find('[data-testid="record"]').text()).toBe('Neurite lengths, cohort 3')
    const back = wrapper.find('a')
    expect(back.text()).toBe('Datasets')
    expect(back.attributes('href')).toBe('/datasets')
    expect(wrapper.find('[role="progressbar"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="error-notice"]').exists()).toBe(false)
  })

  it('says why the record may be missing, with a way to its list, when the server does not know it', async () => {
    const wrapper = await mountPage({
      error: new ApiError({ status: 404, code: 'NOT_FOUND', message: 'No such dataset' }),
    })
    expect(wrapper.find('h1').text()).toBe('This dataset is not here')
    expect(wrapper.text()).toContain('It may have been deleted.')
    expect(wrapper.find('a').text()).toBe('Go to datasets')
    expect(wrapper.find('[data-testid="record"]').exists()).toBe(false)
    expect(wrapper.find('[data-testid="error-notice"]').exists()).toBe(false)
  })

  it('spins only while loading without the record', async () => {
    const waiting = await mountPage({ loading: true, loaded: false })
    expect(waiting.find('[role="progressbar"]').attributes('aria-label')).toBe('Loading the dataset')
    waiting.unmount()
    const refreshing = await mountPage({ loading: true, loaded: true })
    expect(refreshing.find('[role="progressbar"]').exists()).toBe(false)
  })

  it('shows the load error and asks for a retry', async () => {
    const wrapper = await mountPage({
      error: new ApiError({ status: 500, code: 'INTERNAL', message: 'Database unavailable' }),
    })
    const notice = wrapper.find('[data-testid="error-notice"]')
    expect(notice.text()).toContain('The dataset could not be loaded')
    expect(notice.text()).toContain('Database unavailable')
    await notice.find('button').trigger('click')
    expect(wrapper.emitted('retry')).toEqual([[]])
  })

  it('widens the page only when asked', async () => {
    const usual = await mountPage()
    expect(usual.find('.v-container').classes()).not.toContain('nw-page--wide')
    usual.unmount()
    const wide = await mountPage({ wide: true })
    expect(wide.find('.v-container').classes()).toContain('nw-page--wide')
  })
})
