import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { fakeFetch } from '@/testing/fake-fetch'
import { useSharedAnalysisStore } from './shared-analysis'

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => vi.unstubAllGlobals())

describe('useSharedAnalysisStore', () => {
  it('keeps the shared result, and names the unit table of that link', async () => {
    const shared = { analysisName: 'Neurite length', versionNo: 2 }
    const fake = fakeFetch({ 'GET /api/v1/shared/tok-1': { status: 200, body: { data: shared } } })
    vi.stubGlobal('fetch', fake.fetch)
    const store = useSharedAnalysisStore()
    await store.open('tok-1')
    expect(store.shared).toEqual(shared)
    expect(store.error).toBeNull()
    expect(store.unitsCsvUrl()).toBe('/api/v1/shared/tok-1/units.csv')
  })

  it('keeps a refused link as an error for the page to explain', async () => {
    const gone = { status: 404, body: { error: { code: 'NOT_FOUND', message: 'This link has expired.' } } }
    vi.stubGlobal('fetch', fakeFetch({ 'GET /api/v1/shared/old': gone }).fetch)
    const store = useSharedAnalysisStore()
    await store.open('old')
    expect(store.shared).toBeNull()
    expect(store.error?.status).toBe(404)
    expect(store.error?.message).toBe('This link has expired.')
  })
})
