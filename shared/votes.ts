/**
 * The vote rules the console previews and the server enforces: a vote's rules from the plan and the
 * facilitator's choices, one dot applied to a voter's ballot, and the ranked rows a dot vote carries
 * forward. Pure functions over plain values; the server stores, the screens show.
 */
import type { ActivitySettings } from './schemas/agenda-item';
import type { VoteRules } from './schemas/voting';
import { checkBallot, criteriaMatrix, OVERALL_CRITERION, suggestDotsPerVoter, type BallotCheck, type Dot, type DotChange, type DotVoteRules, type Tally, type TallyRow } from './tally';
import { MATRIX_RANKING, rankByMatrix, type MatrixRow } from './matrix';

/** What {@link rulesFor} reads of an agenda item: its type and the plan's settings. */
export type VoteItemPlan = { type: string; settings: Pick<ActivitySettings, 'dotsPerVoter' | 'topN' | 'capPerOption' | 'allowStacking' | 'criteria'> };

/**
 * The rules of a vote: what the facilitator gave, else the plan's settings of the item, else Cairn's
 * defaults (dots per voter suggested from the number of options by {@link suggestDotsPerVoter}, a cap of the
 * whole budget, stacking allowed, the top 3, or every option for a team sort). Not yet checked: the
 * server parses the answer with the `VoteRules` schema, whose refusals name the fields.
 * @example rulesFor({ type: 'dot_vote', settings: {} }, 12).dotsPerVoter // 4
 */
export function rulesFor(item: VoteItemPlan, optionCount: number, given: Partial<VoteRules> = {}): VoteRules {
  const s = item.settings;
  const dotsPerVoter = given.dotsPerVoter ?? (optionCount >= 2 ? suggestDotsPerVoter(optionCount) : (s.dotsPerVoter ?? 3));
  const topN = given.topN ?? s.topN ?? (item.type === 'team_sort' ? optionCount : 3);
  const criteria = given.criteria ?? s.criteria ?? [];
  return {
    dotsPerVoter,
    // Without a cap of its own, one option may take the whole budget.
    capPerOption: given.capPerOption ?? s.capPerOption ?? dotsPerVoter,
    allowStacking: given.allowStacking ?? s.allowStacking ?? true,
    criteria,
    topN: Math.max(1, optionCount > 0 ? Math.min(topN, optionCount) : topN),
    // Two criteria (impact and effort) rank by their matrix unless the facilitator says otherwise.
    rankBy: given.rankBy ?? (criteria.length >= 2 ? MATRIX_RANKING : OVERALL_CRITERION),
    method: given.method ?? 'schulze',
  };
}

/** The answer of {@link castDot}: the voter's dots after the change, or why the change is refused. */
export type DotCast = { ok: true; dots: Dot[]; count: number } | Extract<BallotCheck, { ok: false }>;

/**
 * One dot added (`delta` +1) or taken back (-1) on a voter's ballot, checked by {@link checkBallot}: the
 * voter's dots after it (the changed one in its place, a count of 0 dropped) and the changed dot's count.
 * @example castDot(rules, [], 'p1', { optionId: 'a', criterionId: 'overall', delta: 1 }) // { ok: true, dots: [{ voterId: 'p1', optionId: 'a', criterionId: 'overall', count: 1 }], count: 1 }
 */
export function castDot(rules: DotVoteRules, dots: readonly Dot[], voterId: string, change: DotChange): DotCast {
  const check = checkBallot(rules, dots, change);
  if (!check.ok) return check;
  // One loop builds the ballot after the change (a count of 0 dropped), and a changed dot is a literal with
  // Dot's fields in Dot's order, as the server reads dots from the file. The dot path runs this thousands of
  // times a second in a room's vote: with one shape of array and of dot, V8 compiles it once, where a copy
  // by spread and arrays from map, filter and spread had it compiled again in the middle of the vote.
  const at = dots.findIndex((d) => d.optionId === change.optionId && d.criterionId === change.criterionId);
  const count = (at < 0 ? 0 : dots[at]!.count) + change.delta;
  const next: Dot[] = [];
  for (let i = 0; i < dots.length; i++) {
    const was = dots[i]!;
    const d = i === at ? { voterId: was.voterId, optionId: was.optionId, criterionId: was.criterionId, count } : was;
    if (d.count > 0) next.push(d);
  }
  if (at < 0 && count > 0) next.push({ voterId, optionId: change.optionId, criterionId: change.criterionId, count });
  return { ok: true, dots: next, count };
}

/** A dot vote's matrix of two criteria: the second across (x), the first up (y), each option placed and ranked. */
export type DotMatrix = { xCriterionId: string; yCriterionId: string; points: MatrixRow[] };

/**
 * The rows a dot vote ranks by and its matrix: with two criteria the matrix places each option (the first
 * criterion, e.g. impact, up; the second, e.g. effort, across); the rows follow the rules' `rankBy` — the
 * matrix (its rows carry the first criterion's dots), all criteria together, or one criterion, falling back
 * to all together for a criterion the tally does not have.
 * @example rankedRows({ rankBy: 'overall', criteria: [] }, tally).ranked === tally.overall // true
 */
export function rankedRows(rules: Pick<VoteRules, 'rankBy' | 'criteria'>, tally: Tally): { ranked: TallyRow[]; matrix: DotMatrix | null } {
  const [first, second] = rules.criteria;
  const points = first && second ? rankByMatrix(criteriaMatrix(tally, second.id, first.id), first.dotMeans ?? 'high', second.dotMeans ?? 'high') : null;
  const matrix = first && second && points ? { xCriterionId: second.id, yCriterionId: first.id, points } : null;
  const ranked: TallyRow[] =
    rules.rankBy === MATRIX_RANKING && points
      ? // A matrix row's dots are the first criterion's: the matrix orders by quadrant, then by them.
        points.map((m) => ({ optionId: m.optionId, dots: m.y, rank: m.rank, tied: m.tied, nearTie: false }))
      : rules.rankBy === OVERALL_CRITERION
        ? tally.overall
        : (tally.perCriterion[rules.rankBy] ?? tally.overall);
  return { ranked, matrix };
}
