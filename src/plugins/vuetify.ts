import '@fontsource/roboto/latin-400.css'
import '@fontsource/roboto/latin-500.css'
import '@fontsource/roboto/latin-700.css'
import '@mdi/font/css/materialdesignicons.css'
import 'vuetify/styles'
import { createVuetify } from 'vuetify'
import { aliases, mdi } from 'vuetify/iconsets/mdi'
import { DARK_THEME, LIGHT_THEME, nestwiseDark, nestwiseLight, type ThemeName } from './themes'

// Components and directives are imported on use by vite-plugin-vuetify (autoImport).
export function createNestwiseVuetify(initialTheme: ThemeName = LIGHT_THEME) {
  return createVuetify({
    theme: {
      defaultTheme: initialTheme,
      themes: { [LIGHT_THEME]: nestwiseLight, [DARK_THEME]: nestwiseDark },
    },
    icons: { defaultSet: 'mdi', aliases, sets: { mdi } },
    defaults: {
      VCard: { rounded: 'lg' },
      VTextField: { variant: 'outlined', density: 'comfortable', color: 'primary' },
      VAlert: { variant: 'tonal', density: 'comfortable' },
      VBtn: { rounded: 'lg' },
    },
  })
}
