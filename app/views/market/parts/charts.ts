// ECharts pieces the usage pages draw with (tree-shaken registration; registering twice is harmless).
import { use } from 'echarts/core';
import { BarChart, LineChart } from 'echarts/charts';
import { GridComponent, LegendComponent, TooltipComponent } from 'echarts/components';
import { CanvasRenderer } from 'echarts/renderers';

use([BarChart, LineChart, GridComponent, LegendComponent, TooltipComponent, CanvasRenderer]);

/** A stacked daily bar chart: one series per group (key, listing), days on the x axis, gaps filled with zero. */
export function dailyStack(rows: { day: string; group: string; value: number }[], days: number): Record<string, unknown> {
  const end = new Date();
  const axis: string[] = [];
  for (let i = days - 1; i >= 0; i--) axis.push(new Date(Date.UTC(end.getUTCFullYear(), end.getUTCMonth(), end.getUTCDate() - i)).toISOString().slice(0, 10));
  const groups = [...new Set(rows.map((r) => r.group))];
  const series = groups.map((group) => ({
    name: group,
    type: 'bar',
    stack: 'requests',
    data: axis.map((day) => rows.filter((r) => r.group === group && r.day === day).reduce((sum, r) => sum + r.value, 0)),
  }));
  return {
    // Theme colours (app/styles/theme.css) first: copper, moss, ink; then muted companions.
    color: ['#8a4b2a', '#3d7550', '#55616a', '#b98a5e', '#7fa487', '#a3adb3'],
    tooltip: { trigger: 'axis' },
    legend: { top: 0, type: 'scroll' },
    grid: { left: 50, right: 16, top: 36, bottom: 28 },
    xAxis: { type: 'category', data: axis.map((d) => d.slice(5)) },
    yAxis: { type: 'value', minInterval: 1 },
    series,
  };
}
