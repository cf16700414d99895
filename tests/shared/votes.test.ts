import { describe, expect, it } from 'vitest';
import { castDot, rankedRows, rulesFor } from '../../shared/votes';
import { tallyDots, type Dot, type DotVoteRules } from '../../shared/tally';
import { VoteRules } from '../../shared/schemas/voting';

const dot = (voterId: string, optionId: string, count = 1, criterionId = 'overall'): Dot => ({ voterId, optionId, criterionId, count });

describe('rulesFor: a vote’s rules from the facilitator, the plan, then the defaults', () => {
  it('suggests the dots from the number of options: a third of 12 is 4 (Global Learning Partners, "Dot-mocracy")', () => {
    const r = rulesFor({ type: 'dot_vote', settings: {} }, 12);
    expect(r.dotsPerVoter).toBe(4);
    // One option may take the whole budget unless a cap is set (Cairn's own default, common practice to allow stacking).
    expect(r.capPerOption).toBe(4);
    expect(r.allowStacking).toBe(true);
    expect(r).toEqual({ dotsPerVoter: 4, capPerOption: 4, allowStacking: true, criteria: [], topN: 3, rankBy: 'overall', method: 'schulze' });
    expect(VoteRules.safeParse(r).success).toBe(true);
  });

  it('keeps the plan’s dots before there are options, and 3 without a plan (common practice: 3–5 dots)', () => {
    expect(rulesFor({ type: 'dot_vote', settings: { dotsPerVoter: 5 } }, 0).dotsPerVoter).toBe(5);
    expect(rulesFor({ type: 'dot_vote', settings: {} }, 0).dotsPerVoter).toBe(3);
    // With two or more options the suggestion wins over the plan, unless the facilitator gives a number.
    expect(rulesFor({ type: 'dot_vote', settings: { dotsPerVoter: 5 } }, 6).dotsPerVoter).toBe(3);
    expect(rulesFor({ type: 'dot_vote', settings: { dotsPerVoter: 5 } }, 6, { dotsPerVoter: 2 }).dotsPerVoter).toBe(2);
  });

  it('carries the top 3 forward, never more than there are options; a team sort keeps every challenge', () => {
    expect(rulesFor({ type: 'dot_vote', settings: {} }, 2).topN).toBe(2);
    expect(rulesFor({ type: 'dot_vote', settings: { topN: 5 } }, 8).topN).toBe(5);
    expect(rulesFor({ type: 'team_sort', settings: {} }, 4).topN).toBe(4);
    // Before set-up (no options) the number stays as planned, and at least 1.
    expect(rulesFor({ type: 'team_sort', settings: {} }, 0).topN).toBe(1);
    expect(rulesFor({ type: 'dot_vote', settings: { topN: 6 } }, 0).topN).toBe(6);
  });

  it('ranks two criteria by their matrix, and fewer by all criteria together (common practice: impact against effort)', () => {
    const criteria = [
      { id: 'impact', label: 'Impact' },
      { id: 'effort', label: 'Effort' },
    ];
    expect(rulesFor({ type: 'dot_vote', settings: { criteria } }, 6).rankBy).toBe('matrix');
    expect(rulesFor({ type: 'dot_vote', settings: { criteria: criteria.slice(0, 1) } }, 6).rankBy).toBe('overall');
    expect(rulesFor({ type: 'dot_vote', settings: { criteria } }, 6, { rankBy: 'effort' }).rankBy).toBe('effort');
  });
});

describe('castDot: one dot applied to a voter’s ballot', () => {
  const rules: DotVoteRules = { dotsPerVoter: 3, capPerOption: 2, allowStacking: true, criteria: [] };
  const change = (optionId: string, delta: number) => ({ optionId, criterionId: 'overall', delta });

  it('adds a new dot at the end, stacks onto its own place, and drops a dot taken back to 0 (worked by hand)', () => {
    const one = castDot(rules, [], 'p', change('a', 1));
    expect(one).toEqual({ ok: true, dots: [dot('p', 'a')], count: 1 });
    const two = castDot(rules, [dot('p', 'a'), dot('p', 'b')], 'p', change('a', 1));
    expect(two).toEqual({ ok: true, dots: [dot('p', 'a', 2), dot('p', 'b')], count: 2 });
    const back = castDot(rules, [dot('p', 'a'), dot('p', 'b')], 'p', change('a', -1));
    expect(back).toEqual({ ok: true, dots: [dot('p', 'b')], count: 0 });
  });

  it('refuses what checkBallot refuses, with its code: the budget, the cap, a dot below 0', () => {
    const full = [dot('p', 'a', 2), dot('p', 'b')];
    expect(castDot(rules, full, 'p', change('c', 1))).toMatchObject({ ok: false, code: 'budget_exceeded' });
    expect(castDot(rules, [dot('p', 'a', 2)], 'p', change('a', 1))).toMatchObject({ ok: false, code: 'cap_exceeded' });
    expect(castDot(rules, [], 'p', change('a', -1))).toMatchObject({ ok: false, code: 'negative' });
    expect(castDot({ ...rules, allowStacking: false }, [dot('p', 'a')], 'p', change('a', 1))).toMatchObject({ ok: false, code: 'stacking_off' });
  });

  it('leaves the ballot it was given as it was', () => {
    const mine = [dot('p', 'a')];
    castDot(rules, mine, 'p', change('a', 1));
    expect(mine).toEqual([dot('p', 'a')]);
  });

  it('writes every dot it makes with the fields in one order, as the server reads dots from the file (one shape for the dot path)', () => {
    const fields = ['voterId', 'optionId', 'criterionId', 'count'];
    const added = castDot(rules, [dot('p', 'b')], 'p', change('a', 1));
    const stacked = castDot(rules, [dot('p', 'a'), dot('p', 'b')], 'p', change('a', 1));
    for (const cast of [added, stacked]) {
      if (!cast.ok) throw new Error('refused');
      for (const d of cast.dots) expect(Object.keys(d)).toEqual(fields);
    }
  });
});

describe('rankedRows: what a dot vote ranks by', () => {
  const criteria = [
    { id: 'impact', label: 'Impact', dotMeans: 'high' as const },
    { id: 'effort', label: 'Effort', dotMeans: 'low' as const },
  ];
  // Impact: a: 4, b: 1, c: 3; effort (a dot = easy to do): a: 0, b: 4, c: 3. Worked by hand.
  const dots = [
    dot('v1', 'a', 4, 'impact'),
    dot('v1', 'b', 1, 'impact'),
    dot('v1', 'c', 3, 'impact'),
    dot('v2', 'b', 4, 'effort'),
    dot('v2', 'c', 3, 'effort'),
  ];
  const tally = tallyDots(['a', 'b', 'c'], ['impact', 'effort'], dots);

  it('takes the overall rows for "overall", and one criterion’s rows by its id', () => {
    expect(rankedRows({ rankBy: 'overall', criteria }, tally).ranked).toBe(tally.overall);
    expect(rankedRows({ rankBy: 'effort', criteria }, tally).ranked).toBe(tally.perCriterion.effort);
    // A criterion the tally does not have falls back to all criteria together.
    expect(rankedRows({ rankBy: 'cost', criteria }, tally).ranked).toBe(tally.overall);
  });

  it('orders by the matrix with two criteria: high impact and easy first (common practice), the rows carrying impact’s dots', () => {
    const { ranked, matrix } = rankedRows({ rankBy: 'matrix', criteria }, tally);
    expect(matrix).toMatchObject({ xCriterionId: 'effort', yCriterionId: 'impact' });
    // c: impact 3 of 4 (high), easy 3 of 4 (high) → the "quick win" quadrant first; a: high impact, hard; b: low impact, easy.
    expect(ranked.map((r) => [r.optionId, r.dots])).toEqual([
      ['c', 3],
      ['a', 4],
      ['b', 1],
    ]);
    expect(ranked.every((r) => r.nearTie === false)).toBe(true);
  });

  it('has no matrix with fewer than two criteria', () => {
    const one = tallyDots(['a', 'b'], ['overall'], [dot('v', 'a')]);
    expect(rankedRows({ rankBy: 'matrix', criteria: [] }, one)).toEqual({ ranked: one.overall, matrix: null });
  });
});
