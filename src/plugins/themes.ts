import type { ThemeDefinition } from 'vuetify'

/**
 * Nestwise colours: one deep teal as the primary colour, an ochre accent for warnings,
 * and quiet neutrals so charts and badges carry the colour on analysis screens.
 */
export const LIGHT_THEME = 'nestwiseLight'
export const DARK_THEME = 'nestwiseDark'
export type ThemeName = typeof LIGHT_THEME | typeof DARK_THEME

export const nestwiseLight: ThemeDefinition = {
  dark: false,
  colors: {
    background: '#f5f7f7',
    surface: '#ffffff',
    'surface-bright': '#ffffff',
    'surface-light': '#eaf0f0',
    // Vuetify uses surface-variant for tooltips: dark on light pages, light on dark ones.
    'surface-variant': '#2b3a3d',
    'on-surface-variant': '#eef3f3',
    primary: '#1d5e66',
    'primary-darken-1': '#144a51',
    secondary: '#4b5f66',
    // Dark enough for 4.5:1 as text on the page and on its own tonal chips (WCAG 1.4.3).
    warning: '#8f5200',
    error: '#b3261e',
    success: '#2e7d4f',
    info: '#35607a',
  },
  // Vuetify's 0.6 makes field labels, hints and subtitles #7a7a7a: below 4.5:1 on the page.
  variables: { 'medium-emphasis-opacity': 0.7 },
}

export const nestwiseDark: ThemeDefinition = {
  dark: true,
  colors: {
    background: '#101617',
    surface: '#182022',
    'surface-bright': '#dfe9ea',
    'surface-light': '#2b3739',
    'surface-variant': '#d6e1e2',
    'on-surface-variant': '#101617',
    primary: '#74c3c9',
    'primary-darken-1': '#5aa9af',
    secondary: '#a9bcc2',
    warning: '#f0b45a',
    error: '#f2b8b5',
    success: '#84d1a4',
    info: '#9cc3dc',
  },
  variables: { 'medium-emphasis-opacity': 0.74 },
}
