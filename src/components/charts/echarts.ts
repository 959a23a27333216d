// Only the chart types the findings pages draw are registered, to keep the bundle small; this
// module is imported by lazily loaded pages only.
import { use } from 'echarts/core'
import { BarChart, CustomChart, LineChart, ScatterChart } from 'echarts/charts'
import {
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TitleComponent,
  TooltipComponent,
} from 'echarts/components'
import { SVGRenderer } from 'echarts/renderers'

use([
  BarChart,
  CustomChart,
  LineChart,
  ScatterChart,
  GridComponent,
  LegendComponent,
  MarkLineComponent,
  TitleComponent,
  TooltipComponent,
  // SVG keeps charts sharp in the printed report.
  SVGRenderer,
])

/** Series colours of our own: rosin, spruce, varnish, slate, then muted wood tones. */
export const SERIES_COLORS = [
  '#b86f1e',
  '#3f6b4f',
  '#a6402b',
  '#4f6b84',
  '#8a6d3b',
  '#6e5a7e',
  '#2f7f86',
  '#9c8a5a',
]

export const FONT = "'Atkinson Hyperlegible', system-ui, sans-serif"
