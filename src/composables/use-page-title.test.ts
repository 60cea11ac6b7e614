// @vitest-environment happy-dom
import { describe, expect, it } from 'vitest'
import { nextTick, ref } from 'vue'
import { usePageTitle } from './use-page-title'

describe('usePageTitle', () => {
  it('names the tab after what the page shows, once it is known', async () => {
    document.title = 'Analysis · Nestwise'
    const name = ref<string | null>(null)
    usePageTitle(() => name.value)
    expect(document.title).toBe('Analysis · Nestwise')
    name.value = 'Neurite length, NW-117 vs vehicle'
    await nextTick()
    expect(document.title).toBe('Neurite length, NW-117 vs vehicle · Nestwise')
  })
})
