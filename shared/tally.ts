import type { Criterion } from './schemas/agenda-item';
import { countOf } from './words';
import { because, type Why } from './reasons';
import { finite, whole } from './numbers';

/** The rules of one dot vote, e.g. `{ dotsPerVoter: 5, capPerOption: 2, allowStacking: true, criteria: [] }`. */
export type DotVoteRules = {
  /** Dots each voter may spend, per criterion. */
  dotsPerVoter: number;
  /** Most dots one voter may put on one option (per criterion). */
  capPerOption: number;
  /** Whether a voter may put more than one dot on one option. */
  allowStacking: boolean;
  /** The criteria voted on; an empty list means one criterion, `'overall'`. */
  criteria: Criterion[];
};

/** Dots one voter put on one option for one criterion. */
export type Dot = { voterId: string; optionId: string; criterionId: string; count: number };

/** A voter's request to add (`delta > 0`) or take back (`delta < 0`) dots on one option. */
export type DotChange = { optionId: string; criterionId: string; delta: number };

/** Why a dot change was refused. */
export type BallotErrorCode = 'budget_exceeded' | 'cap_exceeded' | 'stacking_off' | 'negative' | 'unknown_criterion' | 'not_a_count';

/** The answer of {@link checkBallot}. */
export type BallotCheck = { ok: true } | { ok: false; code: BallotErrorCode; message: string; why: Why };

/** One option's line in a tally. */
export type TallyRow = {
  optionId: string;
  dots: number;
  /** Standard competition rank ("1224"): 1 + the number of options with more dots. */
  rank: number;
  /** Another option has exactly as many dots, and more than none: options nobody put a dot on do not tie. */
  tied: boolean;
  /** The next count above or below (a different one, more than none) is within the near-tie margin; never for 0 dots. */
  nearTie: boolean;
};

/** Tallies per criterion and over all criteria, each ordered by dots (most first), then by the given option order. */
export type Tally = { perCriterion: Record<string, TallyRow[]>; overall: TallyRow[] };

/** How close two different counts must be to count as a near tie. */
export type NearTieMargin = {
  /** Share of the larger count; the resulting margin is rounded up to a whole dot. */
  relative: number;
  /** Margin in dots that always counts as near. */
  absolute: number;
};

/** The criterion id used when a dot vote has no criteria of its own. */
export const OVERALL_CRITERION = 'overall';

/**
 * Default near-tie margin: 5 % of the larger count rounded up to a whole dot, and never less than 1 dot.
 * Dots are whole, so the margin is too: Global Learning Partners ("Dot-mocracy") call 39 vs 37 effectively
 * a tie, and 5 % of 39 = 1.95 rounds up to 2 dots, which flags it.
 */
export const DEFAULT_NEAR_TIE: NearTieMargin = { relative: 0.05, absolute: 1 };

/**
 * The criterion ids a dot vote is counted under.
 * @example criterionIds({ ...rules, criteria: [] }) // ['overall']
 */
export function criterionIds(rules: Pick<DotVoteRules, 'criteria'>): string[] {
  return rules.criteria.length > 0 ? rules.criteria.map((c) => c.id) : [OVERALL_CRITERION];
}

function criterionOf(rules: DotVoteRules, criterionId: string): string | null {
  return rules.criteria.find((c) => c.id === criterionId)?.label ?? null;
}

/**
 * Whether one voter may make a dot change, given the dots they already hold; the budget is per criterion.
 * The server calls it inside the transaction that writes the change; taking dots back is always allowed
 * down to zero. Refuses (`not_a_count`) a change that is not a whole number of dots; dots already held
 * whose count is not a whole number are ignored.
 * @example checkBallot(rules, myDots, { optionId: 'o1', criterionId: 'overall', delta: 1 })
 */
export function checkBallot(rules: DotVoteRules, existingDotsOfVoter: readonly Dot[], change: DotChange): BallotCheck {
  if (!Number.isInteger(change.delta)) {
    return { ok: false, code: 'not_a_count', message: 'Add or take back whole dots.', why: because('dot_whole') };
  }
  if (!criterionIds(rules).includes(change.criterionId)) {
    return { ok: false, code: 'unknown_criterion', message: 'This vote has no such criterion.', why: because('dot_criterion_unknown') };
  }
  let onOption = 0;
  let spent = 0;
  for (const dot of existingDotsOfVoter) {
    if (dot.criterionId !== change.criterionId || !Number.isInteger(dot.count)) continue;
    spent += dot.count;
    if (dot.optionId === change.optionId) onOption += dot.count;
  }
  const after = onOption + change.delta;
  if (after < 0) {
    return { ok: false, code: 'negative', message: 'There is no dot there to take back.', why: because('dot_none_back') };
  }
  // Taking dots back must stay possible even if the rules were tightened after the dots were placed.
  if (change.delta <= 0) return { ok: true };
  // The criterion's own name, as the facilitator wrote it, when the vote has criteria.
  const criterion = criterionOf(rules, change.criterionId);
  const where = criterion ? ` for ${criterion}` : '';
  if (!rules.allowStacking && after > 1) {
    const why = criterion ? because('dot_one_each_for', { criterion }) : because('dot_one_each');
    return { ok: false, code: 'stacking_off', message: `One dot per option${where} in this vote.`, why };
  }
  if (after > rules.capPerOption) {
    const count = rules.capPerOption;
    return {
      ok: false,
      code: 'cap_exceeded',
      message: `At most ${countOf(count, 'dot')} on one option${where}.`,
      why: criterion ? because('dot_cap_for', { count, criterion }) : because('dot_cap', { count }),
    };
  }
  if (spent + change.delta > rules.dotsPerVoter) {
    const left = Math.max(0, rules.dotsPerVoter - spent);
    const count = rules.dotsPerVoter;
    return {
      ok: false,
      code: 'budget_exceeded',
      message: `You have ${countOf(count, 'dot')}${where} and ${left} left.`,
      why: criterion ? because('dot_budget_for', { count, left, criterion }) : because('dot_budget', { count, left }),
    };
  }
  return { ok: true };
}

/**
 * Suggested dots per voter for a number of options.
 * Rule: a third of the options, rounded (Global Learning Partners, "Dot-mocracy"), kept within 3–5 (the
 * common range, published guides; the Dotmocracy handbook's "about a quarter of the options" falls in it
 * for 12–20 options), and never more than half the options, so a vote still separates them (Cairn's own
 * limit), and at least 1. Gives 1 for up to 3 options, 2 for 4–5, 3 for 6–10, 4 for 11–13, 5 from 14 on.
 * Refuses a number of options that is not a whole number of 0 or more.
 * @example suggestDotsPerVoter(12) // 4
 */
export function suggestDotsPerVoter(optionCount: number): number {
  whole('The number of options', optionCount);
  const third = Math.round(optionCount / 3);
  const common = Math.min(5, Math.max(3, third));
  return Math.max(1, Math.min(common, Math.floor(optionCount / 2)));
}

/**
 * Standard competition ranks ("1224") of scores, higher first, in the order given. Refuses a score that
 * is not a finite number (NaN has no place in an order: [3, NaN, 5] would otherwise rank 1, 2, 3).
 * @example competitionRanks([5, 9, 5, 2]) // [2, 1, 2, 4]
 */
export function competitionRanks(scores: number[]): number[] {
  scores.forEach((score, i) => finite(`Score ${i + 1}`, score));
  const sorted = [...scores].sort((a, b) => b - a);
  const firstIndex = new Map<number, number>();
  sorted.forEach((score, i) => {
    if (!firstIndex.has(score)) firstIndex.set(score, i);
  });
  return scores.map((score) => (firstIndex.get(score) ?? 0) + 1);
}

/** Whether two different counts lie within the near-tie margin. */
function isNear(a: number, b: number, margin: NearTieMargin): boolean {
  const larger = Math.max(a, b);
  // The small epsilon keeps floating-point noise (0.05 * 60 = 3.0000000000000004) from adding a dot.
  const allowed = Math.max(margin.absolute, Math.ceil(margin.relative * larger - 1e-9));
  return Math.abs(a - b) <= allowed;
}

/** Rows for one set of counts: ordered by dots (most first), then by option order; ranked and flagged. */
function rowsFrom(optionIds: string[], counts: Map<string, number>, margin: NearTieMargin): TallyRow[] {
  const order = optionIds
    .map((optionId, index) => ({ optionId, index, dots: counts.get(optionId) ?? 0 }))
    .sort((a, b) => b.dots - a.dots || a.index - b.index);
  const ranks = competitionRanks(order.map((o) => o.dots));
  // Options without a dot share the last rank but are no tie for the facilitator to decide: nobody chose
  // them. A count near nothing is no near tie either (the top-N cut-off says so where it falls among them).
  const distinct = [...new Set(order.map((o) => o.dots))].filter((d) => d > 0); // descending, as `order` is
  return order.map(({ optionId, dots }, i) => {
    const at = distinct.indexOf(dots);
    const above = at < 0 ? undefined : distinct[at - 1];
    const below = at < 0 ? undefined : distinct[at + 1];
    return {
      optionId,
      dots,
      rank: ranks[i],
      tied: dots > 0 && (order[i - 1]?.dots === dots || order[i + 1]?.dots === dots),
      nearTie:
        (above !== undefined && isNear(above, dots, margin)) || (below !== undefined && isNear(below, dots, margin)),
    };
  });
}

/**
 * Adds up dots per criterion and over all criteria, skipping dots on unknown options or criteria and counts
 * that are not whole. Kept apart from `tallyDots`: the live tally runs this loop over a room's thousands of
 * dots a few times a second, so the engine optimises this small loop alone rather than the whole tally
 * with it (compiling that took the server more time than counting, and again each time it was redone).
 */
function countDots(options: ReadonlySet<string>, dots: readonly Dot[], perCriterion: Map<string, Map<string, number>>, overall: Map<string, number>): void {
  for (const dot of dots) {
    const counts = perCriterion.get(dot.criterionId);
    if (!counts || !options.has(dot.optionId) || !Number.isInteger(dot.count)) continue;
    counts.set(dot.optionId, (counts.get(dot.optionId) ?? 0) + dot.count);
    overall.set(dot.optionId, (overall.get(dot.optionId) ?? 0) + dot.count);
  }
}

/**
 * Counts the dots per criterion and over all criteria (the sum of every criterion's dots).
 * Dots on options or criteria not listed are ignored (e.g. an option removed after voting), and so are
 * dots whose count is not a whole number.
 * @example tallyDots(['a', 'b'], ['overall'], dots).overall[0] // { optionId: 'a', dots: 7, rank: 1, ... }
 */
export function tallyDots(
  optionIds: string[],
  criterionIdList: string[],
  dots: Dot[],
  margin: NearTieMargin = DEFAULT_NEAR_TIE,
): Tally {
  const perCriterionCounts = new Map(criterionIdList.map((c) => [c, new Map<string, number>()]));
  const overallCounts = new Map<string, number>();
  countDots(new Set(optionIds), dots, perCriterionCounts, overallCounts);
  const perCriterion: Record<string, TallyRow[]> = {};
  for (const [criterionId, counts] of perCriterionCounts) {
    perCriterion[criterionId] = rowsFrom(optionIds, counts, margin);
  }
  return { perCriterion, overall: rowsFrom(optionIds, overallCounts, margin) };
}

/** What the tie policy says of a top N, as numbers each screen words (`carryForward.policy…`): the places, those still open, the options across the cut-off and whether they got no votes. */
export type TieLine = { places: number; open: number; count: number; unvoted: boolean };

/**
 * The tie policy's line of a top N of `places` (the vote's top N, at most its number of options), for the
 * console's carry-forward and the results page alike.
 * @example tieLine({ selected: ['a'], tiedAtCutoff: ['b', 'c'], unvotedAtCutoff: false }, 2) // { places: 2, open: 1, count: 2, unvoted: false }
 */
export function tieLine(top: { selected: readonly string[]; tiedAtCutoff: readonly string[]; unvotedAtCutoff: boolean }, places: number): TieLine {
  return { places, open: Math.max(0, places - top.selected.length), count: top.tiedAtCutoff.length, unvoted: top.unvotedAtCutoff };
}

/**
 * The top N of a tally, with Cairn's tie policy: options whose whole tie group fits in the top N are
 * selected; a tie group that straddles the cut-off is returned in `tiedAtCutoff` for the facilitator to
 * break, and none of it is selected; `policy` says so in words for the console. When that group is the
 * options nobody voted for (`unvoted`, e.g. the options of a dot vote with no dot), it is no tie:
 * `policy` says plainly that the last places can only be filled by picking among options without a
 * vote (`unvotedAtCutoff`). Refuses an N that is not a whole number of 0 or more, and rows whose rank is not a whole number
 * of 1 or more.
 * @example selectTopN(rows, 3) // { selected: ['a', 'b'], tiedAtCutoff: ['c', 'd'], policy: '…' }
 */
export function selectTopN(
  rows: TallyRow[],
  n: number,
  unvoted: ReadonlySet<string> = new Set(),
): { selected: string[]; tiedAtCutoff: string[]; unvotedAtCutoff: boolean; policy: string } {
  whole('N', n);
  for (const row of rows) whole(`The rank of ${row.optionId}`, row.rank, 1);
  const ordered = [...rows].sort((a, b) => a.rank - b.rank);
  const groupSize = new Map<number, number>();
  for (const row of ordered) groupSize.set(row.rank, (groupSize.get(row.rank) ?? 0) + 1);
  // Places are counted from the rows ahead, not read off the rank: a Schulze rank (1 + the options that
  // beat it) can be smaller than the number of options ahead of it.
  const ahead = new Map<number, number>();
  let seen = 0;
  for (const [rank, size] of groupSize) {
    ahead.set(rank, seen);
    seen += size;
  }
  const selected: string[] = [];
  const tiedAtCutoff: string[] = [];
  for (const row of ordered) {
    const before = ahead.get(row.rank) ?? 0;
    const lastPlace = before + (groupSize.get(row.rank) ?? 1);
    if (lastPlace <= n) selected.push(row.optionId);
    else if (before < n) tiedAtCutoff.push(row.optionId);
  }
  const places = Math.max(0, n);
  const unvotedAtCutoff = tiedAtCutoff.length > 0 && tiedAtCutoff.every((id) => unvoted.has(id));
  let policy =
    `Top ${places}: options ranked inside the top ${places} are selected; ` +
    'options tied across the cut-off are left to the facilitator to break.';
  if (tiedAtCutoff.length > 0) {
    const open = places - selected.length;
    const last = open === 1 ? 'the last place' : `the last ${open} places`;
    policy += unvotedAtCutoff
      ? ` ${countOf(tiedAtCutoff.length, 'option')} got no votes at all, so this is no tie: to fill the top ${places}, pick ${open} of them for ${last}.`
      : ` ${tiedAtCutoff.length} options tie for ${last}.`;
  }
  return { selected, tiedAtCutoff, unvotedAtCutoff, policy };
}

/**
 * Who of the voters present has voted, and how many of their dots are still unspent (over every criterion).
 * Dots of voters who are not present are not counted, so the rate stays between 0 and 1; dots whose count
 * is not a whole number are ignored; a budget (dotsPerVoter) that is not a whole number is refused.
 * @example participation(['v1', 'v2'], dots, rules) // { voters: 2, voted: 1, rate: 0.5, dotsLeft: 7 }
 */
export function participation(
  voterIds: string[],
  dots: Dot[],
  rules: DotVoteRules,
): { voters: number; voted: number; rate: number; dotsLeft: number } {
  whole('Dots per voter', rules.dotsPerVoter);
  const present = new Set(voterIds);
  const criteria = criterionIds(rules);
  // Per voter who voted, their dots per criterion (the live tally counts a room's thousands of dots a few times a second).
  const spent = new Map<string, Map<string, number>>();
  for (const dot of dots) {
    if (!present.has(dot.voterId) || !criteria.includes(dot.criterionId) || !Number.isInteger(dot.count) || dot.count <= 0) continue;
    let mine = spent.get(dot.voterId);
    if (!mine) {
      mine = new Map();
      spent.set(dot.voterId, mine);
    }
    mine.set(dot.criterionId, (mine.get(dot.criterionId) ?? 0) + dot.count);
  }
  let dotsLeft = 0;
  for (const voterId of present) {
    const mine = spent.get(voterId);
    for (const criterionId of criteria) dotsLeft += Math.max(0, rules.dotsPerVoter - (mine?.get(criterionId) ?? 0));
  }
  const voters = present.size;
  return { voters, voted: spent.size, rate: voters === 0 ? 0 : spent.size / voters, dotsLeft };
}

/**
 * Each option's dots under two criteria, for a criteria matrix (e.g. impact against effort), in the
 * overall order.
 * @example criteriaMatrix(tally, 'effort', 'impact') // [{ optionId: 'a', x: 2, y: 9 }, …]
 */
export function criteriaMatrix(
  tally: Tally,
  xCriterionId: string,
  yCriterionId: string,
): { optionId: string; x: number; y: number }[] {
  const dotsUnder = (criterionId: string): Map<string, number> => {
    const rows = tally.perCriterion[criterionId];
    if (!rows) throw new RangeError(`The tally has no criterion '${criterionId}'`);
    return new Map(rows.map((r) => [r.optionId, r.dots]));
  };
  const xs = dotsUnder(xCriterionId);
  const ys = dotsUnder(yCriterionId);
  return tally.overall.map(({ optionId }) => ({ optionId, x: xs.get(optionId) ?? 0, y: ys.get(optionId) ?? 0 }));
}
