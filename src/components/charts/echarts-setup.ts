import { BarChart, CustomChart, LineChart, ScatterChart } from 'echarts/charts'
import {
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TitleComponent,
  TooltipComponent,
} from 'echarts/components'
import { use } from 'echarts/core'
import { CanvasRenderer, SVGRenderer } from 'echarts/renderers'

// Only the pieces the analysis charts draw, so echarts stays small and in the analysis chunk.
// The SVG renderer is here for the SVG export.
use([
  CanvasRenderer,
  SVGRenderer,
  ScatterChart,
  BarChart,
  LineChart,
  CustomChart,
  GridComponent,
  TooltipComponent,
  LegendComponent,
  TitleComponent,
  MarkLineComponent,
])
