import { describe, expect, it } from 'vitest';
import {
  type Dot,
  type DotVoteRules,
  checkBallot,
  competitionRanks,
  criteriaMatrix,
  criterionIds,
  participation,
  selectTopN,
  suggestDotsPerVoter,
  tallyDots,
} from '../../shared/tally';

const rules: DotVoteRules = { dotsPerVoter: 5, capPerOption: 3, allowStacking: true, criteria: [] };
const impactEffort: DotVoteRules = {
  ...rules,
  criteria: [
    { id: 'impact', label: 'Impact' },
    { id: 'effort', label: 'Effort' },
  ],
};

function dot(voterId: string, optionId: string, count = 1, criterionId = 'overall'): Dot {
  return { voterId, optionId, criterionId, count };
}

function change(optionId: string, delta: number, criterionId = 'overall') {
  return { optionId, criterionId, delta };
}

/** Dots that give each option the counts asked for, each from a different voter. */
function dotsFor(counts: Record<string, number>, criterionId = 'overall'): Dot[] {
  return Object.entries(counts).flatMap(([optionId, n]) =>
    Array.from({ length: n }, (_, i) => dot(`v${i}`, optionId, 1, criterionId)),
  );
}

describe('competitionRanks', () => {
  it('gives standard competition ranks ("1224")', () => {
    // Wikipedia, "Ranking", standard competition ranking: A ahead of B = C ahead of D gives 1, 2, 2, 4.
    expect(competitionRanks([10, 8, 8, 5])).toEqual([1, 2, 2, 4]);
  });

  it('keeps the order given and handles repeats anywhere', () => {
    expect(competitionRanks([5, 9, 5, 2])).toEqual([2, 1, 2, 4]);
    expect(competitionRanks([3, 3, 3])).toEqual([1, 1, 1]);
    expect(competitionRanks([1, 2, 2, 2, 0])).toEqual([4, 1, 1, 1, 5]);
    expect(competitionRanks([])).toEqual([]);
  });
});

describe('checkBallot', () => {
  it('counts an empty criteria list as one criterion, overall', () => {
    expect(criterionIds(rules)).toEqual(['overall']);
    expect(criterionIds(impactEffort)).toEqual(['impact', 'effort']);
  });

  it('accepts a dot within budget and cap', () => {
    expect(checkBallot(rules, [], change('a', 1))).toEqual({ ok: true });
    expect(checkBallot(rules, [dot('v', 'a', 2)], change('a', 1))).toEqual({ ok: true });
  });

  it('refuses a dot beyond the budget', () => {
    const mine = [dot('v', 'a', 3), dot('v', 'b', 2)];
    const check = checkBallot(rules, mine, change('c', 1));
    expect(check).toMatchObject({ ok: false, code: 'budget_exceeded' });
    // Moving a dot is take-back first, then spend.
    expect(checkBallot(rules, mine, change('a', -1))).toEqual({ ok: true });
    expect(checkBallot(rules, [dot('v', 'a', 2), dot('v', 'b', 2)], change('c', 1))).toEqual({ ok: true });
  });

  it('keeps a budget per criterion', () => {
    const mine = [dot('v', 'a', 3, 'impact'), dot('v', 'b', 2, 'impact')];
    const check = checkBallot(impactEffort, mine, change('c', 1, 'impact'));
    expect(check).toMatchObject({ ok: false, code: 'budget_exceeded' });
    expect(checkBallot(impactEffort, mine, change('a', 3, 'effort'))).toEqual({ ok: true });
  });

  it('refuses more dots on one option than the cap', () => {
    const check = checkBallot(rules, [dot('v', 'a', 3)], change('a', 1));
    expect(check).toMatchObject({ ok: false, code: 'cap_exceeded' });
    expect(checkBallot(rules, [], change('a', 4))).toMatchObject({ code: 'cap_exceeded' });
  });

  it('refuses a second dot on an option when stacking is off', () => {
    const noStacking = { ...rules, allowStacking: false };
    const check = checkBallot(noStacking, [dot('v', 'a')], change('a', 1));
    expect(check).toMatchObject({ ok: false, code: 'stacking_off' });
    expect(checkBallot(noStacking, [dot('v', 'a')], change('b', 1))).toEqual({ ok: true });
  });

  it('refuses taking back dots that are not there', () => {
    expect(checkBallot(rules, [], change('a', -1))).toMatchObject({ ok: false, code: 'negative' });
    expect(checkBallot(rules, [dot('v', 'a', 2)], change('a', -2))).toEqual({ ok: true });
  });

  it('refuses a criterion the vote does not have', () => {
    expect(checkBallot(impactEffort, [], change('a', 1))).toMatchObject({ ok: false, code: 'unknown_criterion' });
  });

  it('always lets a voter take dots back, even over tightened rules', () => {
    const tightened = { ...rules, dotsPerVoter: 2, capPerOption: 1, allowStacking: false };
    expect(checkBallot(tightened, [dot('v', 'a', 3), dot('v', 'b', 2)], change('a', -1))).toEqual({ ok: true });
  });

  it('says what went wrong in words', () => {
    const check = checkBallot(impactEffort, [dot('v', 'a', 5, 'impact')], change('b', 1, 'impact'));
    expect(check.ok).toBe(false);
    if (!check.ok) expect(check.message).toBe('You have 5 dots for Impact and 0 left.');
  });
});

describe('suggestDotsPerVoter', () => {
  it('gives about a third of the options (Global Learning Partners, "Dot-mocracy")', () => {
    expect(suggestDotsPerVoter(9)).toBe(3);
    expect(suggestDotsPerVoter(12)).toBe(4);
    expect(suggestDotsPerVoter(15)).toBe(5);
  });

  it('stays within the common 3–5 when there are enough options (published guides)', () => {
    for (let options = 6; options <= 100; options++) {
      const dots = suggestDotsPerVoter(options);
      expect(dots).toBeGreaterThanOrEqual(3);
      expect(dots).toBeLessThanOrEqual(5);
    }
    // Dotmocracy handbook: about a quarter of the options, a dozen options or fewer; 12 options → 3, inside the band.
    expect(Math.abs(suggestDotsPerVoter(12) - 12 / 4)).toBeLessThanOrEqual(1);
  });

  it('gives at least 1 and never more than half the options (Cairn’s own limit)', () => {
    expect([0, 1, 2, 3, 4, 5, 6].map(suggestDotsPerVoter)).toEqual([1, 1, 1, 1, 2, 2, 3]);
    for (let options = 2; options <= 100; options++) {
      expect(suggestDotsPerVoter(options)).toBeLessThanOrEqual(Math.floor(options / 2));
    }
  });
});

describe('tallyDots', () => {
  it('orders by dots then by the given option order, with competition ranks', () => {
    const { overall } = tallyDots(['a', 'b', 'c', 'd'], ['overall'], dotsFor({ a: 2, b: 8, c: 5, d: 5 }));
    expect(overall.map((r) => [r.optionId, r.dots, r.rank, r.tied])).toEqual([
      ['b', 8, 1, false],
      ['c', 5, 2, true],
      ['d', 5, 2, true],
      ['a', 2, 4, false],
    ]);
  });

  it('flags 39 vs 37 as a near tie (Global Learning Partners: effectively a tie)', () => {
    const { overall } = tallyDots(['x', 'y', 'z'], ['overall'], dotsFor({ x: 39, y: 37, z: 20 }));
    expect(overall.map((r) => [r.optionId, r.nearTie, r.tied])).toEqual([
      ['x', true, false],
      ['y', true, false],
      ['z', false, false],
    ]);
  });

  it('uses a margin of 5 % of the larger count (rounded up to a dot) or 1 dot', () => {
    const near = (a: number, b: number) =>
      tallyDots(['a', 'b'], ['overall'], dotsFor({ a, b })).overall.every((r) => r.nearTie);
    expect(near(39, 36)).toBe(false);
    expect(near(10, 9)).toBe(true);
    expect(near(10, 8)).toBe(false);
    // Cairn's own rule: a count is never near nothing (0 dots is no tie, exact or near).
    expect(near(1, 0)).toBe(false);
    expect(near(2, 1)).toBe(true);
    expect(near(100, 95)).toBe(true);
    expect(near(100, 94)).toBe(false);
    expect(near(60, 57)).toBe(true); // 5 % of 60 is 3 exactly, not 4 by floating-point noise
    expect(near(60, 56)).toBe(false);
    // A custom margin.
    const wide = tallyDots(['a', 'b'], ['overall'], dotsFor({ a: 10, b: 7 }), { relative: 0.3, absolute: 0 });
    expect(wide.overall.every((r) => r.nearTie)).toBe(true);
  });

  it('reports exact ties as tied, and near ties against the next different count', () => {
    const { overall } = tallyDots(['a', 'b', 'c', 'd'], ['overall'], dotsFor({ a: 10, b: 10, c: 9, d: 4 }));
    expect(overall.map((r) => [r.optionId, r.tied, r.nearTie])).toEqual([
      ['a', true, true],
      ['b', true, true],
      ['c', false, true],
      ['d', false, false],
    ]);
  });

  it('tallies each criterion and sums them overall, ignoring unknown options and criteria', () => {
    const dots = [
      dot('v1', 'a', 2, 'impact'),
      dot('v2', 'a', 1, 'impact'),
      dot('v1', 'b', 1, 'effort'),
      dot('v2', 'b', 3, 'effort'),
      dot('v1', 'gone', 5, 'impact'),
      dot('v1', 'a', 5, 'overall'),
    ];
    const tally = tallyDots(['a', 'b', 'c'], ['impact', 'effort'], dots);
    expect(Object.keys(tally.perCriterion)).toEqual(['impact', 'effort']);
    expect(tally.perCriterion.impact.map((r) => [r.optionId, r.dots, r.rank])).toEqual([
      ['a', 3, 1],
      ['b', 0, 2],
      ['c', 0, 2],
    ]);
    expect(tally.perCriterion.effort.map((r) => [r.optionId, r.dots])).toEqual([
      ['b', 4],
      ['a', 0],
      ['c', 0],
    ]);
    expect(tally.overall.map((r) => [r.optionId, r.dots, r.rank])).toEqual([
      ['b', 4, 1],
      ['a', 3, 2],
      ['c', 0, 3],
    ]);
  });

  it('lists every option, with zero dots when nobody voted, sharing the rank but not flagged as a tie', () => {
    const { overall } = tallyDots(['a', 'b'], ['overall'], []);
    expect(overall).toEqual([
      { optionId: 'a', dots: 0, rank: 1, tied: false, nearTie: false },
      { optionId: 'b', dots: 0, rank: 1, tied: false, nearTie: false },
    ]);
  });

  it('flags no tie on the rows of a criterion that got 0 dots (an Impact and an Effort table)', () => {
    // Standard competition ranking ("1224") still gives the 0-dot rows one shared rank; only the flag changes.
    const tally = tallyDots(['a', 'b', 'c', 'd'], ['impact', 'effort'], [dot('v1', 'a', 2, 'impact'), dot('v1', 'b', 2, 'impact'), dot('v2', 'c', 1, 'effort')]);
    expect(tally.perCriterion.impact.map((r) => [r.optionId, r.dots, r.rank, r.tied, r.nearTie])).toEqual([
      ['a', 2, 1, true, false],
      ['b', 2, 1, true, false],
      ['c', 0, 3, false, false],
      ['d', 0, 3, false, false],
    ]);
    expect(tally.perCriterion.effort.map((r) => [r.optionId, r.dots, r.rank, r.tied, r.nearTie])).toEqual([
      ['c', 1, 1, false, false],
      ['a', 0, 2, false, false],
      ['b', 0, 2, false, false],
      ['d', 0, 2, false, false],
    ]);
  });
});

describe('selectTopN', () => {
  const rowsOf = (counts: Record<string, number>) =>
    tallyDots(Object.keys(counts), ['overall'], dotsFor(counts)).overall;

  it('selects the top N when no tie crosses the cut-off', () => {
    const top = selectTopN(rowsOf({ a: 9, b: 7, c: 5, d: 5, e: 1 }), 2);
    expect(top.selected).toEqual(['a', 'b']);
    expect(top.tiedAtCutoff).toEqual([]);
    expect(top.policy).toMatch(/tied across the cut-off are left to the facilitator/);
  });

  it('includes a tie group that fits entirely inside the top N', () => {
    const top = selectTopN(rowsOf({ a: 9, b: 7, c: 5, d: 5, e: 1 }), 4);
    expect(top.selected).toEqual(['a', 'b', 'c', 'd']);
    expect(top.tiedAtCutoff).toEqual([]);
  });

  it('leaves a tie across the cut-off to the facilitator', () => {
    const top = selectTopN(rowsOf({ a: 9, b: 7, c: 5, d: 5, e: 5, f: 1 }), 3);
    expect(top.selected).toEqual(['a', 'b']);
    expect(top.tiedAtCutoff).toEqual(['c', 'd', 'e']);
    expect(top.policy).toContain('3 options tie for the last place.');
    const two = selectTopN(rowsOf({ a: 9, b: 9, c: 9, d: 1 }), 2);
    expect(two.selected).toEqual([]);
    expect(two.tiedAtCutoff).toEqual(['a', 'b', 'c']);
    expect(two.policy).toContain('tie for the last 2 places');
  });

  it('says plainly when the cut-off falls among options nobody voted for: no tie, places to fill', () => {
    const rows = rowsOf({ a: 4, b: 2, c: 0, d: 0, e: 0 });
    const unvoted = new Set(rows.filter((r) => r.dots === 0).map((r) => r.optionId));
    const top = selectTopN(rows, 3, unvoted);
    expect(top).toMatchObject({ selected: ['a', 'b'], tiedAtCutoff: ['c', 'd', 'e'], unvotedAtCutoff: true });
    expect(top.policy).toContain('3 options got no votes at all, so this is no tie: to fill the top 3, pick 1 of them for the last place.');
    expect(top.policy).not.toContain('tie for the last');
    // A real tie at the cut-off keeps its wording.
    const tie = selectTopN(rowsOf({ a: 4, b: 2, c: 2, d: 0 }), 2, new Set(['d']));
    expect(tie).toMatchObject({ selected: ['a'], tiedAtCutoff: ['b', 'c'], unvotedAtCutoff: false });
    expect(tie.policy).toContain('2 options tie for the last place.');
  });

  it('selects everything when N covers every option, and nothing for N = 0', () => {
    expect(selectTopN(rowsOf({ a: 2, b: 2 }), 5).selected).toEqual(['a', 'b']);
    expect(selectTopN(rowsOf({ a: 2, b: 1 }), 0)).toMatchObject({ selected: [], tiedAtCutoff: [] });
  });
});

describe('participation', () => {
  it('counts voters present who spent a dot and the dots they have left', () => {
    const dots = [dot('v1', 'a', 2), dot('v1', 'b', 1), dot('v2', 'a', 5), dot('left', 'a', 3)];
    expect(participation(['v1', 'v2', 'v3', 'v4'], dots, rules)).toEqual({
      voters: 4,
      voted: 2,
      rate: 0.5,
      dotsLeft: 2 + 0 + 5 + 5,
    });
  });

  it('counts the budget of every criterion', () => {
    const dots = [dot('v1', 'a', 5, 'impact'), dot('v1', 'b', 1, 'effort')];
    expect(participation(['v1', 'v2'], dots, impactEffort)).toEqual({ voters: 2, voted: 1, rate: 0.5, dotsLeft: 14 });
  });

  it('gives a rate of 0 for an empty room', () => {
    expect(participation([], [], rules)).toEqual({ voters: 0, voted: 0, rate: 0, dotsLeft: 0 });
  });
});

describe('criteriaMatrix', () => {
  it('pairs each option’s dots under two criteria, in the overall order', () => {
    const dots = [
      ...dotsFor({ a: 6, b: 2, c: 4 }, 'impact'),
      ...dotsFor({ a: 1, b: 6, c: 0 }, 'effort'),
    ];
    const tally = tallyDots(['a', 'b', 'c'], ['impact', 'effort'], dots);
    expect(criteriaMatrix(tally, 'effort', 'impact')).toEqual([
      { optionId: 'b', x: 6, y: 2 },
      { optionId: 'a', x: 1, y: 6 },
      { optionId: 'c', x: 0, y: 4 },
    ]);
  });

  it('refuses a criterion the tally does not have', () => {
    const tally = tallyDots(['a'], ['overall'], []);
    expect(() => criteriaMatrix(tally, 'impact', 'overall')).toThrow(RangeError);
  });
});
