/** The theme colours every analysis chart draws with (see useChartColors). */
export interface ChartColors {
  text: string
  muted: string
  grid: string
  naive: string
  nested: string
  background: string
}
