// @vitest-environment happy-dom
import { mount } from '@vue/test-utils'
import { defineComponent, h } from 'vue'
import { useTheme } from 'vuetify'
import { describe, expect, it } from 'vitest'
import { DARK_THEME, LIGHT_THEME } from '@/plugins/themes'
import { createNestwiseVuetify } from '@/plugins/vuetify'
import { storedThemeName, THEME_STORAGE_KEY, useThemePreference } from './use-theme-preference'

function memoryStorage(initial: Record<string, string> = {}) {
  const values = new Map(Object.entries(initial))
  return {
    getItem: (key: string) => values.get(key) ?? null,
    setItem: (key: string, value: string) => void values.set(key, value),
  }
}

describe('storedThemeName', () => {
  it('uses the saved choice first, then the system preference', () => {
    expect(storedThemeName(memoryStorage({ [THEME_STORAGE_KEY]: 'dark' }), false)).toBe(DARK_THEME)
    expect(storedThemeName(memoryStorage({ [THEME_STORAGE_KEY]: 'light' }), true)).toBe(LIGHT_THEME)
    expect(storedThemeName(memoryStorage(), true)).toBe(DARK_THEME)
    expect(storedThemeName(memoryStorage({ [THEME_STORAGE_KEY]: 'purple' }), false)).toBe(LIGHT_THEME)
  })

  it('survives storage that throws', () => {
    const broken = {
      getItem: () => {
        throw new Error('denied')
      },
      setItem: () => {},
    }
    expect(storedThemeName(broken, false)).toBe(LIGHT_THEME)
  })
})

describe('useThemePreference', () => {
  it('switches the Vuetify theme and remembers the choice', () => {
    const storage = memoryStorage()
    let api!: ReturnType<typeof useThemePreference>
    let theme!: ReturnType<typeof useTheme>
    const Probe = defineComponent({
      setup() {
        api = useThemePreference(storage)
        theme = useTheme()
        return () => h('div')
      },
    })
    mount(Probe, { global: { plugins: [createNestwiseVuetify(LIGHT_THEME)] } })

    expect(api.isDark.value).toBe(false)
    api.toggle()
    expect(theme.global.name.value).toBe(DARK_THEME)
    expect(api.isDark.value).toBe(true)
    expect(storage.getItem(THEME_STORAGE_KEY)).toBe('dark')
    api.setDark(false)
    expect(storage.getItem(THEME_STORAGE_KEY)).toBe('light')
    expect(storedThemeName(storage, true)).toBe(LIGHT_THEME)
  })
})
