import { createPinia, setActivePinia } from 'pinia'
import { afterEach, beforeEach, describe, expect, it, vi } from 'vitest'
import { ERROR_BAR_STORAGE_KEY, isErrorBarType, useDisplayPreferencesStore } from './display-preferences'

function memoryStorage(initial: Record<string, string> = {}) {
  const data = new Map(Object.entries(initial))
  return {
    getItem: (key: string) => data.get(key) ?? null,
    setItem: (key: string, value: string) => void data.set(key, value),
    data,
  }
}

beforeEach(() => setActivePinia(createPinia()))
afterEach(() => vi.unstubAllGlobals())

describe('useDisplayPreferencesStore', () => {
  it('starts with SEM when nothing was chosen on this browser', () => {
    vi.stubGlobal('localStorage', memoryStorage())
    expect(useDisplayPreferencesStore().errorBar).toBe('sem')
  })

  it('remembers the viewer’s choice across visits', () => {
    const storage = memoryStorage()
    vi.stubGlobal('localStorage', storage)
    useDisplayPreferencesStore().setErrorBar('ci95')
    expect(storage.data.get(ERROR_BAR_STORAGE_KEY)).toBe('ci95')
    setActivePinia(createPinia())
    expect(useDisplayPreferencesStore().errorBar).toBe('ci95')
  })

  it('ignores a stored value it does not know, and storage that throws', () => {
    vi.stubGlobal('localStorage', memoryStorage({ [ERROR_BAR_STORAGE_KEY]: 'whiskers' }))
    expect(useDisplayPreferencesStore().errorBar).toBe('sem')
    setActivePinia(createPinia())
    vi.stubGlobal('localStorage', {
      getItem: () => {
        throw new Error('denied')
      },
      setItem: () => {
        throw new Error('denied')
      },
    })
    const store = useDisplayPreferencesStore()
    store.setErrorBar('sd')
    expect(store.errorBar).toBe('sd')
  })

  it('knows the three kinds of error bar, as ?bars= may name them', () => {
    expect(['sem', 'sd', 'ci95'].every(isErrorBarType)).toBe(true)
    expect(isErrorBarType('SD')).toBe(false)
    expect(isErrorBarType(['sd'])).toBe(false)
  })
})
