import { computed } from 'vue'
import { useTheme } from 'vuetify'
import type { ChartColors } from './chart-colors'

/** Text, secondary text and grid lines of every chart, so all charts read alike in light and dark. */
export function chartInk(dark: boolean): Pick<ChartColors, 'text' | 'muted' | 'grid'> {
  return {
    text: dark ? '#dfe9ea' : '#1f2a2c',
    muted: dark ? '#8a9a9d' : '#7b8a8d',
    grid: dark ? '#3a4749' : '#c9d3d4',
  }
}

/** Chart colours from the current theme, so charts follow light and dark. */
export function useChartColors() {
  const theme = useTheme()
  return computed<ChartColors>(() => {
    const dark = theme.current.value.dark
    const c = theme.current.value.colors
    return {
      ...chartInk(dark),
      naive: dark ? '#b7c2c4' : '#5f6b6d',
      nested: c.primary,
      background: c.surface,
    }
  })
}
