/** Minimal typings for the reference implementations the tests compare against (they ship none). */
declare module 'munkres-js' {
  /** Optimal assignment of a cost matrix (padded to a square with `padValue`, default 0) as [row, column] pairs. */
  function computeMunkres(costMatrix: number[][], options?: { padValue?: number }): [number, number][];
  export = computeMunkres;
}
