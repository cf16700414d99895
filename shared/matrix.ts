import type { Criterion } from './schemas/agenda-item';
import { finite } from './numbers';

/**
 * The `rankBy` of a dot vote on two criteria or more that ranks by the criteria matrix of the first two:
 * the first criterion high and the second low first (impact high, effort low: common practice).
 */
export const MATRIX_RANKING = 'matrix';

/** Where an option stands under one criterion of the matrix. */
export type Level = 'high' | 'low';

/** What a dot under a criterion says: the option is high on it (impact) or low on it (effort: easy to do). */
export type DotMeans = 'high' | 'low';

/** One option's dots under the matrix's two criteria: `y` the first criterion (up), `x` the second (across). */
export type MatrixInput = { optionId: string; y: number; x: number };

/** One option's place in the matrix ranking. */
export type MatrixRow = {
  optionId: string;
  y: number;
  x: number;
  /** Where the option stands under the first criterion (from its dots and what a dot means). */
  yLevel: Level;
  /** Where the option stands under the second criterion. */
  xLevel: Level;
  /** Standard competition rank ("1224"): 1 + the options ahead of it. */
  rank: number;
  /** Another option is in the same quadrant with the same dots under both criteria, and it got dots: options without any do not tie. */
  tied: boolean;
};

/** The quadrants in the order the matrix ranks them: first criterion high and second low first, then high/high, low/low, low/high. */
export const QUADRANT_ORDER: readonly { y: Level; x: Level }[] = [
  { y: 'high', x: 'low' },
  { y: 'high', x: 'high' },
  { y: 'low', x: 'low' },
  { y: 'low', x: 'high' },
];

/**
 * What a dot under a criterion means, as the phone says it: the facilitator's own wording when set,
 * else Cairn's from the criterion's name and direction.
 * @example dotMeaning({ id: 'effort', label: 'Effort', dotMeans: 'low' }) // 'a dot for each idea with little effort'
 */
export function dotMeaning(c: Pick<Criterion, 'label' | 'hint' | 'dotMeans'>): string {
  const hint = c.hint?.trim();
  if (hint) return hint;
  const name = c.label.trim().toLowerCase();
  return c.dotMeans === 'low' ? `a dot for each idea with little ${name}` : `a dot for each idea with a lot of ${name}`;
}

/**
 * Whether dots make an option high or low under a criterion. The split is at half of the most dots any
 * option got under it (Cairn's reading of "high" for a room's dots, also how the console draws the
 * matrix): more than half counts as many dots. With no dots at all, nobody has many.
 * @example levelOf(5, 8, 'high') // 'high'
 */
export function levelOf(dots: number, mostDots: number, means: DotMeans): Level {
  finite('Dots', dots);
  finite('The most dots', mostDots);
  const many = mostDots > 0 && dots > mostDots / 2;
  return many === (means === 'high') ? 'high' : 'low';
}

/**
 * Where an option sits along one axis of the matrix plot, from 0 (low on the criterion) to 1 (high): the
 * plot always runs from low to high (the first criterion from the bottom up, the second from left to
 * right), so with impact up and effort across the best quadrant, high impact and low effort, is the
 * top left (the usual reading of an impact/effort matrix, common practice). A dot that means "high"
 * moves the option towards high; a dot that means "low" (effort: "a dot for each idea that would be easy
 * to do") towards low. Above 0.5 is exactly {@link levelOf}'s "high", below it "low"; an option at
 * exactly half the most dots sits on the dividing line. With no dots at all every option sits at the end
 * {@link levelOf} gives it. Refuses dots that are not finite numbers.
 * @example plotPosition(5, 5, 'low') // 0: the most "easy" dots is the lowest effort, at the left
 */
export function plotPosition(dots: number, mostDots: number, means: DotMeans): number {
  finite('Dots', dots);
  finite('The most dots', mostDots);
  const share = mostDots > 0 ? Math.min(1, Math.max(0, dots / mostDots)) : 0;
  return means === 'high' ? share : 1 - share;
}

/**
 * Ranks options by the criteria matrix of two criteria: by quadrant in {@link QUADRANT_ORDER} (first
 * criterion high and second low first: "high impact and low effort first", common practice), inside a
 * quadrant by the first criterion (higher first), then by the second (lower first; Cairn's own order
 * inside a quadrant). `yMeans` and `xMeans` say what a dot means under each criterion, so "a dot for each
 * idea that would be easy to do" counts as low effort. Options equal on all three tie ("1224" ranks).
 * Options keep the given order among ties. Refuses dots that are not finite numbers.
 * @example rankByMatrix([{ optionId: 'a', y: 1, x: 0 }, { optionId: 'b', y: 3, x: 2 }], 'high', 'low')[0].optionId // 'b'
 */
export function rankByMatrix(points: readonly MatrixInput[], yMeans: DotMeans, xMeans: DotMeans): MatrixRow[] {
  points.forEach((p) => {
    finite(`The first criterion's dots of ${p.optionId}`, p.y);
    finite(`The second criterion's dots of ${p.optionId}`, p.x);
  });
  const mostY = Math.max(0, ...points.map((p) => p.y));
  const mostX = Math.max(0, ...points.map((p) => p.x));
  // Larger is better on both: more of the first criterion, less of the second.
  const firstUp = (p: MatrixInput) => (yMeans === 'high' ? p.y : -p.y);
  const secondDown = (p: MatrixInput) => (xMeans === 'low' ? p.x : -p.x);
  const keyed = points.map((p, index) => {
    const yLevel = levelOf(p.y, mostY, yMeans);
    const xLevel = levelOf(p.x, mostX, xMeans);
    const quadrant = QUADRANT_ORDER.findIndex((q) => q.y === yLevel && q.x === xLevel);
    return { p, index, yLevel, xLevel, key: [quadrant, -firstUp(p), -secondDown(p)] as const };
  });
  const compare = (a: (typeof keyed)[number], b: (typeof keyed)[number]) =>
    a.key[0] - b.key[0] || a.key[1] - b.key[1] || a.key[2] - b.key[2];
  const sorted = [...keyed].sort((a, b) => compare(a, b) || a.index - b.index);
  return sorted.map((k) => ({
    optionId: k.p.optionId,
    y: k.p.y,
    x: k.p.x,
    yLevel: k.yLevel,
    xLevel: k.xLevel,
    rank: 1 + sorted.filter((o) => compare(o, k) < 0).length,
    tied: (k.p.y !== 0 || k.p.x !== 0) && sorted.some((o) => o !== k && compare(o, k) === 0),
  }));
}

/**
 * A quadrant in words, as every screen and the report name it.
 * @example quadrantName('Impact', 'high', 'Effort', 'low') // 'Impact high · Effort low'
 */
export function quadrantName(yLabel: string, yLevel: Level, xLabel: string, xLevel: Level): string {
  return `${yLabel} ${yLevel} · ${xLabel} ${xLevel}`;
}

/** What a vote's main ranking goes by, for each screen to word in its language (`dotResults.ranking.<kind>`). */
export type RankingKind =
  | { kind: 'matrix'; first: string; second: string }
  | { kind: 'criterion'; criterion: string }
  | { kind: 'all' | 'dots' | 'borda' | 'schulze' | 'first_choices' };

/**
 * What a dot vote's main ranking is by: the matrix of its first two criteria, one criterion, all criteria
 * together, or plain dots. The one rule every screen words (and rankingName says in English for the exports).
 * @example rankingOf({ rankBy: 'matrix', criteria: [impact, effort] }) // { kind: 'matrix', first: 'Impact', second: 'Effort' }
 */
export function rankingOf(rules: { rankBy: string; criteria: readonly Pick<Criterion, 'id' | 'label'>[] }): RankingKind {
  const [first, second] = rules.criteria;
  if (rules.rankBy === MATRIX_RANKING && first && second) return { kind: 'matrix', first: first.label, second: second.label };
  const criterion = rules.criteria.find((c) => c.id === rules.rankBy);
  if (criterion) return { kind: 'criterion', criterion: criterion.label };
  return { kind: rules.criteria.length ? 'all' : 'dots' };
}

/**
 * What a dot vote's main ranking is by, in English words, for the report and the exports.
 * @example rankingName({ rankBy: 'matrix', criteria: [impact, effort] }) // 'the matrix: Impact high and Effort low first'
 */
export function rankingName(rules: { rankBy: string; criteria: readonly Pick<Criterion, 'id' | 'label'>[] }): string {
  const r = rankingOf(rules);
  if (r.kind === 'matrix') return `the matrix: ${r.first} high and ${r.second} low first`;
  if (r.kind === 'criterion') return r.criterion;
  return r.kind === 'all' ? 'all criteria together' : 'dots';
}
