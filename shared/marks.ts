/**
 * Cairn's criterion marks: variants of a round dot sticker (solid, ring, half, dot in ring), each with
 * its own colour and letter, so no meaning rests on colour alone. Every screen and the PDF draw them
 * from these declarations.
 */

import { LIGHT } from './palette';

/** The four sticker variants a criterion's mark can take. */
export type MarkShape = 'solid' | 'ring' | 'half' | 'dot_in_ring';

/** The criteria's marks in the order criteria are numbered: colour (light themes), sticker variant and letter. */
export const CRITERION_MARKS = [
  { colour: LIGHT.primary, shape: 'solid', letter: 'A' },
  { colour: '#b9452f', shape: 'ring', letter: 'B' },
  { colour: '#6b4f1d', shape: 'half', letter: 'C' },
  { colour: '#3d4f8a', shape: 'dot_in_ring', letter: 'D' },
] as const satisfies readonly { colour: string; shape: MarkShape; letter: string }[];

/** One filled region of a mark in a 24 × 24 box: an SVG path, filled with the mark's colour or the paper under it. */
export interface MarkPart {
  d: string;
  fill: 'mark' | 'paper';
}

// A full disc of radius r centred in the 24 × 24 box, as two arcs.
const disc = (r: number): string => `M ${12 - r} 12 A ${r} ${r} 0 1 0 ${12 + r} 12 A ${r} ${r} 0 1 0 ${12 - r} 12 Z`;
// The lower half of a disc: from the left edge round the bottom to the right edge (sweep 0 in a y-down box).
const lowerHalf = (r: number): string => `M ${12 - r} 12 A ${r} ${r} 0 0 0 ${12 + r} 12 Z`;

/** How each sticker variant is drawn: its parts, painted in order (later parts over earlier ones). */
export const MARK_PARTS: Record<MarkShape, readonly MarkPart[]> = {
  solid: [{ d: disc(11), fill: 'mark' }],
  ring: [
    { d: disc(11), fill: 'mark' },
    { d: disc(7.5), fill: 'paper' },
  ],
  half: [
    { d: disc(11), fill: 'mark' },
    { d: disc(9.5), fill: 'paper' },
    { d: lowerHalf(9.5), fill: 'mark' },
  ],
  dot_in_ring: [
    { d: disc(11), fill: 'mark' },
    { d: disc(9), fill: 'paper' },
    { d: disc(6.5), fill: 'mark' },
  ],
};

/**
 * Where a variant's letter sits in the 24 × 24 box (baseline `y`, font `size`) and what it is drawn on:
 * on the mark's colour (drawn in the paper's colour) or on the paper (drawn in the mark's colour).
 */
export const MARK_LETTER: Record<MarkShape, { y: number; size: number; on: 'mark' | 'paper' }> = {
  solid: { y: 16, size: 11, on: 'mark' },
  ring: { y: 15.6, size: 10, on: 'paper' },
  // The upper, empty half holds the letter.
  half: { y: 10.6, size: 8, on: 'paper' },
  dot_in_ring: { y: 15.3, size: 8.5, on: 'mark' },
};

/**
 * The mark of the criterion at `index` (wrapping after four).
 * @example criterionMark(1) // { colour: '#b9452f', shape: 'ring', letter: 'B' }
 */
export function criterionMark(index: number): (typeof CRITERION_MARKS)[number] {
  return CRITERION_MARKS[((index % CRITERION_MARKS.length) + CRITERION_MARKS.length) % CRITERION_MARKS.length]!;
}
