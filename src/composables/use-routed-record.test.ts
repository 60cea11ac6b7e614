// @vitest-environment happy-dom
import { flushPromises, mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { createMemoryHistory, createRouter, RouterView } from 'vue-router'
import { afterEach, describe, expect, it } from 'vitest'
import { useRoutedRecord } from './use-routed-record'

afterEach(() => {
  document.body.innerHTML = ''
})

async function showAt(path: string) {
  const opened: [number, number | undefined][] = []
  let state!: ReturnType<typeof useRoutedRecord>
  const Page = defineComponent({
    setup() {
      state = useRoutedRecord('datasetId', (id, versionNo) => opened.push([id, versionNo]))
      return () => h('p', 'page')
    },
  })
  const router = createRouter({
    history: createMemoryHistory(),
    routes: [{ path: '/datasets/:datasetId', component: Page }],
  })
  await router.push(path)
  await router.isReady()
  mount(RouterView, { global: { plugins: [router] }, attachTo: document.body })
  await flushPromises()
  return { opened, router, state: () => state }
}

describe('useRoutedRecord', () => {
  it('opens the record named in the route, with the version asked for', async () => {
    const { opened, state } = await showAt('/datasets/7?version=3')
    expect(opened).toEqual([[7, 3]])
    expect(state().id.value).toBe(7)
    expect(state().versionQuery.value).toBe(3)
  })

  it('opens the next record when the parameter changes, but not when only the version does', async () => {
    const { opened, router, state } = await showAt('/datasets/7')
    expect(opened).toEqual([[7, undefined]])
    await router.push('/datasets/7?version=2')
    await flushPromises()
    expect(state().versionQuery.value).toBe(2)
    await router.push('/datasets/9')
    await flushPromises()
    expect(opened).toEqual([
      [7, undefined],
      [9, undefined],
    ])
  })

  it('ignores a parameter or version that is not a positive whole number', async () => {
    const { opened, state } = await showAt('/datasets/abc?version=1.5')
    expect(opened).toEqual([])
    expect(state().versionQuery.value).toBeUndefined()
    const zero = await showAt('/datasets/0?version=-2')
    expect(zero.opened).toEqual([])
  })
})
