import { computed } from 'vue'
import { useTheme } from 'vuetify'
import { DARK_THEME, LIGHT_THEME, type ThemeName } from '@/plugins/themes'

export const THEME_STORAGE_KEY = 'nestwise.theme'

type StorageLike = Pick<Storage, 'getItem' | 'setItem'>

/**
 * The theme chosen last time on this browser; without a choice, follow the system setting.
 * Storage can throw (privacy modes), which must never stop the app from starting.
 */
export function storedThemeName(
  storage: StorageLike | undefined = globalThis.localStorage,
  prefersDark: boolean = globalThis.matchMedia?.('(prefers-color-scheme: dark)').matches ?? false,
): ThemeName {
  try {
    const saved = storage?.getItem(THEME_STORAGE_KEY)
    if (saved === 'dark') return DARK_THEME
    if (saved === 'light') return LIGHT_THEME
  } catch {
    // fall through to the system preference
  }
  return prefersDark ? DARK_THEME : LIGHT_THEME
}

export function useThemePreference(storage: StorageLike | undefined = globalThis.localStorage) {
  const theme = useTheme()
  const isDark = computed(() => theme.global.name.value === DARK_THEME)

  function setDark(dark: boolean): void {
    theme.change(dark ? DARK_THEME : LIGHT_THEME)
    try {
      storage?.setItem(THEME_STORAGE_KEY, dark ? 'dark' : 'light')
    } catch {
      // the choice then lasts for this visit only
    }
  }

  return { isDark, setDark, toggle: () => setDark(!isDark.value) }
}
