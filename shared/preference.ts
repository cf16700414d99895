import { competitionRanks } from './tally';
import { atLeast } from './numbers';

/**
 * One voter's preference order, most preferred first; `weight` (default 1) counts it as that many voters.
 * An option missing from `ranking` ranks below every listed one, tied with the other missing ones;
 * unknown ids and repeats (after the first) are ignored. A weight that is not a finite number of 0 or more
 * is refused (RangeError) by every count below.
 */
export type Ballot = { ranking: string[]; weight?: number };

/** An option's Borda count and its standard competition rank ("1224"). */
export type BordaRow = { optionId: string; points: number; rank: number };

/**
 * An option's place in the Schulze order: `rank` is 1 + the number of options that beat it on strongest
 * paths, so rank 1 is the Schulze winner set; `wins` counts the options it beats.
 */
export type SchulzeRow = { optionId: string; rank: number; wins: number };

/** Position of each option index on one ballot; missing options share the position after the last listed. */
function positions(optionIndex: Map<string, number>, ballot: Ballot): { pos: number[]; listed: number } {
  const pos = new Array<number>(optionIndex.size).fill(-1);
  let listed = 0;
  for (const optionId of ballot.ranking) {
    const i = optionIndex.get(optionId);
    if (i === undefined || pos[i] !== -1) continue;
    pos[i] = listed++;
  }
  return { pos: pos.map((p) => (p === -1 ? listed : p)), listed };
}

/** A ballot's weight, refused unless it is a finite number of 0 or more. */
function weightOf(ballot: Ballot): number {
  return atLeast('A ballot’s weight', ballot.weight ?? 1, 0);
}

function indexOf(options: string[]): Map<string, number> {
  return new Map(options.map((o, i) => [o, i]));
}

function square(n: number): number[][] {
  return Array.from({ length: n }, () => new Array<number>(n).fill(0));
}

/**
 * The pairwise table: `d[i][j]` is the (weighted) number of voters who prefer option i to option j.
 * @example pairwiseMatrix(['a', 'b'], [{ ranking: ['b', 'a'] }]) // [[0, 0], [1, 0]]
 */
export function pairwiseMatrix(options: string[], ballots: Ballot[]): number[][] {
  const index = indexOf(options);
  const n = options.length;
  const d = square(n);
  for (const ballot of ballots) {
    const weight = weightOf(ballot);
    const { pos } = positions(index, ballot);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) if (pos[i] < pos[j]) d[i][j] += weight;
    }
  }
  return d;
}

/** Options with a score each, ordered by score (highest first) then by the given option order, ranked "1224". */
function ranked(options: string[], scores: number[]): { optionId: string; score: number; rank: number }[] {
  const ranks = competitionRanks(scores);
  return options
    .map((optionId, i) => ({ optionId, i, score: scores[i], rank: ranks[i] }))
    .sort((a, b) => a.rank - b.rank || a.i - b.i)
    .map(({ optionId, score, rank }) => ({ optionId, score, rank }));
}

/**
 * Borda count: with n options a ballot gives n−1 points to its first choice down to 0 for its last.
 * Options a ballot leaves out share the points left over evenly (each gets the average of the places
 * they would take), so a ballot that lists all but one option counts as the full ranking. Points can
 * therefore be halves.
 * @example borda(['a', 'b', 'c'], [{ ranking: ['b'] }]) // b 2, a 0.5, c 0.5
 */
export function borda(options: string[], ballots: Ballot[]): BordaRow[] {
  const index = indexOf(options);
  const n = options.length;
  const points = new Array<number>(n).fill(0);
  for (const ballot of ballots) {
    const weight = weightOf(ballot);
    const { pos, listed } = positions(index, ballot);
    const missingShare = (n - listed - 1) / 2; // average of the points n−listed−1 … 0
    for (let i = 0; i < n; i++) {
      points[i] += weight * (pos[i] < listed ? n - 1 - pos[i] : missingShare);
    }
  }
  return ranked(options, points).map(({ optionId, score, rank }) => ({ optionId, points: score, rank }));
}

/**
 * Schulze method: the pairwise table, the strongest (widest) path strengths `p[i][j]`, and the order.
 * An option beats another when `p[i][j] > p[j][i]`. That relation is transitive but not complete, so
 * counting the options an option beats would put one unbeaten option below another; instead an option's
 * rank is 1 + the number of options that beat it. Rank 1 is then exactly the winner set (the options
 * nobody beats, Schulze 2011 §2), and a beaten option always ranks below everything that beats it.
 * Rows are ordered by rank, then by options beaten (most first), then by the given option order.
 * @example schulze(['a', 'b'], ballots).ranking // [{ optionId: 'b', rank: 1, wins: 1 }, …]
 */
export function schulze(
  options: string[],
  ballots: Ballot[],
): { pairwise: number[][]; strongest: number[][]; ranking: SchulzeRow[] } {
  const n = options.length;
  const d = pairwiseMatrix(options, ballots);
  const p = square(n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) if (i !== j && d[i][j] > d[j][i]) p[i][j] = d[i][j];
  }
  // Widest paths, Floyd–Warshall style (Schulze 2011, §2.3).
  for (let k = 0; k < n; k++) {
    for (let i = 0; i < n; i++) {
      if (i === k) continue;
      for (let j = 0; j < n; j++) {
        if (j !== i && j !== k) p[i][j] = Math.max(p[i][j], Math.min(p[i][k], p[k][j]));
      }
    }
  }
  const beats = (i: number, j: number) => p[i][j] > p[j][i];
  const ranking = options
    .map((optionId, i) => ({
      optionId,
      i,
      rank: 1 + options.filter((_o, j) => beats(j, i)).length,
      wins: options.filter((_o, j) => beats(i, j)).length,
    }))
    .sort((a, b) => a.rank - b.rank || b.wins - a.wins || a.i - b.i)
    .map(({ optionId, rank, wins }) => ({ optionId, rank, wins }));
  return { pairwise: d, strongest: p, ranking };
}

/**
 * The options that share first place in a ranking, or an empty list when one option is first alone.
 * @example sharedFirstPlace([{ optionId: 'b', rank: 1 }, { optionId: 'c', rank: 1 }, { optionId: 'a', rank: 3 }]) // ['b', 'c']
 */
export function sharedFirstPlace(rows: { optionId: string; rank: number }[]): string[] {
  const first = rows.filter((r) => r.rank === 1).map((r) => r.optionId);
  return first.length > 1 ? first : [];
}

/**
 * The plain names of the preference-vote methods on every screen and in the report; the methods' own
 * names (the Borda count, the Schulze method) stay in the code and its docs.
 */
export const METHOD_LABELS = { borda: 'Points by place', schulze: 'Head-to-head' } as const satisfies Record<'borda' | 'schulze', string>;

/** What each method counts, in one sentence a facilitator can repeat to the room. */
export const METHOD_EXPLAINED = {
  borda: 'Points by place: with n options a first place earns n−1 points, a last place 0.',
  schulze: 'Head-to-head: an option beats another when more voters prefer it, counting chains of such wins; the order follows who beats whom.',
} as const satisfies Record<'borda' | 'schulze', string>;
