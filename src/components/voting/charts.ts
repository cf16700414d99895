import {
  BarElement,
  CategoryScale,
  Chart,
  Legend,
  LinearScale,
  PointElement,
  Tooltip,
  type ChartOptions,
} from 'chart.js';
import { LIGHT, PROJECTOR } from '../../theme/palette';
import type { ChartTheme } from './marks';

// Only the parts the voting charts use, so the bundle stays small (vue-chartjs registers each chart's controller).
Chart.register(BarElement, CategoryScale, LinearScale, PointElement, Tooltip, Legend);
// Cairn's own typeface, shipped with the app, on the charts too.
Chart.defaults.font.family = "'Source Sans 3', system-ui, sans-serif";

export { markOf, type ChartTheme } from './marks';

/** Shortens an option's text for a chart axis; the full text is in the table beside the chart. */
export function shortLabel(text: string, max = 42): string {
  return text.length <= max ? text : `${text.slice(0, max - 1).trimEnd()}…`;
}

/** Options of a horizontal bar chart of dots, in the theme's colours and type sizes. */
export function barOptions(theme: ChartTheme, stacked: boolean): ChartOptions<'bar'> {
  const ink = theme === 'light' ? LIGHT.text : PROJECTOR.text;
  const grid = theme === 'light' ? 'rgba(0,0,0,0.08)' : 'rgba(246,241,231,0.15)';
  const size = theme === 'light' ? 13 : 26;
  return {
    indexAxis: 'y',
    responsive: true,
    maintainAspectRatio: false,
    // Tallies arrive a few times a second: short animations keep the bars calm.
    animation: { duration: 250 },
    scales: {
      x: { stacked, beginAtZero: true, ticks: { precision: 0, color: ink, font: { size } }, grid: { color: grid } },
      y: { stacked, ticks: { color: ink, font: { size } }, grid: { display: false } },
    },
    plugins: {
      legend: { display: true, labels: { color: ink, usePointStyle: true, font: { size }, padding: theme === 'light' ? 12 : 24 } },
      tooltip: { enabled: theme === 'light' },
    },
  };
}

export { LONG_OPTION, optionKeys, rankedRows } from './ranking';
