import {
  BarElement,
  CategoryScale,
  Chart,
  Legend,
  LinearScale,
  PointElement,
  Tooltip,
  type ChartOptions,
  type PointStyle,
} from 'chart.js';
import { CRITERION_MARKS, LIGHT, PROJECTOR } from '../../theme/palette';

// Only the parts the voting charts use, so the bundle stays small (vue-chartjs registers each chart's controller).
Chart.register(BarElement, CategoryScale, LinearScale, PointElement, Tooltip, Legend);
// Cairn's own typeface, shipped with the app, on the charts too.
Chart.defaults.font.family = "'Source Sans 3', system-ui, sans-serif";

/** Where a chart is shown: the console on a light card, or the projector's dark screen read from 8 m. */
export type ChartTheme = 'light' | 'projector';

/** chart.js point styles matching each criterion mark's shape, so legends show the shape as well as the colour. */
const POINT_STYLE: Record<(typeof CRITERION_MARKS)[number]['shape'], PointStyle> = {
  circle: 'circle',
  triangle: 'triangle',
  square: 'rect',
  diamond: 'rectRot',
};

/** The projector's light counterparts of the criterion colours: the marks' own colours are too dark to see on its dark screen. */
const PROJECTOR_MARK_COLOURS = [PROJECTOR.teal, PROJECTOR.coral, PROJECTOR.sand, PROJECTOR.muted];

/**
 * The look of the criterion at `index` on a theme: its colour, chart point style, letter and shape.
 * @example markOf(1, 'light') // { colour: '#b9452f', pointStyle: 'triangle', letter: 'B', shape: 'triangle', ink: '#ffffff' }
 */
export function markOf(index: number, theme: ChartTheme) {
  const mark = CRITERION_MARKS[index % CRITERION_MARKS.length]!;
  return {
    colour: theme === 'light' ? mark.colour : PROJECTOR_MARK_COLOURS[index % PROJECTOR_MARK_COLOURS.length]!,
    /** The colour of the letter drawn on the mark. */
    ink: theme === 'light' ? '#ffffff' : PROJECTOR.background,
    pointStyle: POINT_STYLE[mark.shape],
    letter: mark.letter,
    shape: mark.shape,
  };
}

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
