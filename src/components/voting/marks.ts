import type { PointStyle } from 'chart.js';
import { CRITERION_MARKS, PROJECTOR } from '../../theme/palette';

// Only a type comes from chart.js here: the phone draws marks without loading the chart library.

/** Where a mark or chart is shown: the console on a light card, or the projector's dark screen read from 8 m. */
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
