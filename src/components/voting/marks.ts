import type { PointStyle } from 'chart.js';
import { LIGHT, PROJECTOR, PROJECTOR_MARK_COLOURS } from '../../theme/palette';
import { MARK_LETTER, MARK_PARTS, criterionMark, type MarkShape } from '../../../shared/marks';

// Only a type comes from chart.js here: the phone draws marks without loading the chart library.

/** Where a mark or chart is shown: the console on a light card, or the projector's dark screen read from 8 m. */
export type ChartTheme = 'light' | 'projector';

/** Chart point styles drawn from each sticker variant, made once per colour and size (browsers only). */
const pointStyles = new Map<string, PointStyle>();

/**
 * The sticker variant drawn on a small canvas, for chart legends and points: the shape as well as the
 * colour, as on every other screen. Falls back to a plain circle where no canvas exists (tests in Node).
 */
function pointStyleOf(shape: MarkShape, colour: string, paper: string, px = 14): PointStyle {
  const key = `${shape}|${colour}|${paper}|${px}`;
  const known = pointStyles.get(key);
  if (known) return known;
  if (typeof document === 'undefined' || typeof Path2D === 'undefined') return 'circle';
  const canvas = document.createElement('canvas');
  canvas.width = px;
  canvas.height = px;
  const ctx = canvas.getContext('2d');
  if (!ctx) return 'circle';
  ctx.scale(px / 24, px / 24);
  for (const part of MARK_PARTS[shape]) {
    ctx.fillStyle = part.fill === 'mark' ? colour : paper;
    ctx.fill(new Path2D(part.d));
  }
  pointStyles.set(key, canvas);
  return canvas;
}

/**
 * The look of the criterion at `index` on a theme: its colour, the paper it sits on, the letter's ink,
 * chart point style, letter and sticker variant.
 * @example markOf(1, 'light') // { colour: CRITERION_MARKS[1].colour, paper: LIGHT.surface, ink: CRITERION_MARKS[1].colour, letter: 'B', shape: 'ring', ... }
 */
export function markOf(index: number, theme: ChartTheme) {
  const mark = criterionMark(index);
  const colour = theme === 'light' ? mark.colour : PROJECTOR_MARK_COLOURS[index % PROJECTOR_MARK_COLOURS.length]!;
  const paper = theme === 'light' ? LIGHT.surface : PROJECTOR.background;
  const letter = MARK_LETTER[mark.shape];
  return {
    colour,
    /** The colour under the mark's empty parts. */
    paper,
    /** The colour of the letter drawn on the mark. */
    ink: letter.on === 'mark' ? paper : colour,
    pointStyle: pointStyleOf(mark.shape, colour, paper),
    letter: mark.letter,
    shape: mark.shape,
  };
}
