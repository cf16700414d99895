import type { DotVoteResults } from '../../../shared/schemas/voting';

// Kept apart from charts.ts so the dot rows (console, results, projector) load without the chart library.

/** A dot vote's rows in the order its rules rank them (overall, by the chosen criterion, or by the matrix), as the server ranked them. */
export function rankedRows(results: DotVoteResults): DotVoteResults['overall'] {
  return results.ranked;
}

/** Each option's short key on the projector: its place in the ranked list (1, 2, 3 …), unique even where ranks tie. */
export function optionKeys(results: DotVoteResults): Map<string, number> {
  return new Map(rankedRows(results).map((r, i) => [r.optionId, i + 1]));
}

/** Options longer than this (characters) may continue in the projector's next column instead of leaving most of a column empty. */
export const LONG_OPTION = 160;
