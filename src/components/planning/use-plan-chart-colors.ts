import { computed } from 'vue'
import { useTheme } from 'vuetify'
import { chartInk } from '@/components/charts/use-chart-colors'
import type { PlanChartColors } from './plan-chart-options'

/** Colours of the planning and agreement charts from the current theme (the accent marks targets and limits). */
export function usePlanChartColors() {
  const theme = useTheme()
  return computed<PlanChartColors>(() => ({
    ...chartInk(theme.current.value.dark),
    accent: theme.current.value.colors.warning,
  }))
}
