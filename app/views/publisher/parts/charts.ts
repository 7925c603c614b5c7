// ECharts, registered with only the parts the publisher's charts use (tree-shaken: bar charts on a grid, canvas renderer).
import { use } from 'echarts/core';
import { BarChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent } from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';

use([BarChart, GridComponent, LegendComponent, TooltipComponent, CanvasRenderer]);

/** Colours from the theme (app/styles/theme.css): copper for asserted, moss for entailed-only. */
export const CHART_COLOURS = { asserted: '#8a4b2a', entailed: '#3d7550', neutral: '#55616a' };
