// Entry of the custom chart-library build inlined in gtpack pages: only the
// chart types and components the pages use, canvas renderer only.
import * as echarts from 'echarts/core';
import { LineChart, BarChart, ScatterChart, HeatmapChart } from 'echarts/charts';
import {
  GridComponent, TooltipComponent, DataZoomInsideComponent, DataZoomSliderComponent,
  LegendComponent, MarkLineComponent, VisualMapContinuousComponent, DatasetComponent,
} from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';
echarts.use([
  LineChart, BarChart, ScatterChart, HeatmapChart,
  GridComponent, TooltipComponent, DataZoomInsideComponent, DataZoomSliderComponent,
  LegendComponent, MarkLineComponent, VisualMapContinuousComponent, DatasetComponent,
  CanvasRenderer,
]);
window.echarts = echarts;
