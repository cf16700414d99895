/** Minimal typings for the reference implementations the tests compare against (they ship none). */
declare module 'munkres-js' {
  /** Optimal assignment of a cost matrix (padded to a square with `padValue`, default 0) as [row, column] pairs. */
  function computeMunkres(costMatrix: number[][], options?: { padValue?: number }): [number, number][];
  export = computeMunkres;
}

declare module 'wcag-contrast' {
  /** WCAG 2.x contrast ratio of two hex colours. */
  export function hex(a: string, b: string): number;
  /** WCAG 2.x contrast ratio of two RGB triples. */
  export function rgb(a: [number, number, number], b: [number, number, number]): number;
  /** WCAG 2.x relative luminance of an RGB triple. */
  export function luminance(a: [number, number, number]): number;
  /** The WCAG grade of a ratio: 'AAA', 'AA', 'AA Large' or 'Fail'. */
  export function score(ratio: number): string;
}
