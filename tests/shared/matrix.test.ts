import { describe, expect, it } from 'vitest';
import { dotMeaning, levelOf, plotPosition, QUADRANT_ORDER, quadrantName, rankByMatrix, rankingName } from '../../shared/matrix';
import { IMPACT_EFFORT_CRITERIA } from '../../shared/activities';
import { VoteRules } from '../../shared/schemas/voting';

// The impact / effort matrix reads "high impact and low effort first" (common practice, CHECKS.md "Rules of
// thumb of the trade"; no published source). The counts below are worked by hand.

describe('levelOf: high or low under one criterion', () => {
  it('splits at half of the most dots, and turns round where a dot means "low" (easy to do)', () => {
    // Most dots 8: 5 > 4 is many, 4 is not (Cairn's split, the same the console's matrix draws).
    expect(levelOf(5, 8, 'high')).toBe('high');
    expect(levelOf(4, 8, 'high')).toBe('low');
    expect(levelOf(5, 8, 'low')).toBe('low');
    expect(levelOf(0, 8, 'low')).toBe('high');
    // Nobody voted: nobody has many dots.
    expect(levelOf(0, 0, 'high')).toBe('low');
    expect(levelOf(0, 0, 'low')).toBe('high');
  });

  it('refuses dots that are not numbers', () => {
    expect(() => levelOf(Number.NaN, 3, 'high')).toThrow(RangeError);
  });
});

describe('rankByMatrix: high impact and low effort first (common practice)', () => {
  // Impact: a dot = big impact; effort: a dot = easy to do (Cairn's default wording).
  const points = [
    { optionId: 'big-hard', y: 6, x: 0 }, // impact high, effort high (no "easy" dots)
    { optionId: 'small-easy', y: 1, x: 5 }, // impact low, effort low
    { optionId: 'big-easy', y: 5, x: 4 }, // impact high, effort low: first
    { optionId: 'small-hard', y: 2, x: 1 }, // impact low, effort high: last
  ];

  it('puts the options in quadrant order: impact high & effort low, high & high, low & low, low & high', () => {
    const rows = rankByMatrix(points, 'high', 'low');
    expect(rows.map((r) => [r.optionId, r.yLevel, r.xLevel, r.rank])).toEqual([
      ['big-easy', 'high', 'low', 1],
      ['big-hard', 'high', 'high', 2],
      ['small-easy', 'low', 'low', 3],
      ['small-hard', 'low', 'high', 4],
    ]);
    expect(QUADRANT_ORDER[0]).toEqual({ y: 'high', x: 'low' });
  });

  it('never lets effort dots lift an option above a better quadrant (the sum of dots would: 6+0 < 1+5+…)', () => {
    // Summed, small-easy (6) would tie big-hard (6) and beat small-hard (3); by the matrix big-hard stays above it.
    const rows = rankByMatrix(points, 'high', 'low');
    expect(rows.findIndex((r) => r.optionId === 'big-hard')).toBeLessThan(rows.findIndex((r) => r.optionId === 'small-easy'));
  });

  it('reads effort dots the other way round when a dot means "a lot of effort"', () => {
    // The same counts where a dot on effort means hard: big-hard (x 0) is now the easy one.
    const rows = rankByMatrix(points, 'high', 'high');
    expect(rows.map((r) => [r.optionId, r.yLevel, r.xLevel])).toEqual([
      ['big-hard', 'high', 'low'],
      ['big-easy', 'high', 'high'],
      ['small-hard', 'low', 'low'],
      ['small-easy', 'low', 'high'],
    ]);
  });

  it('orders inside a quadrant by impact, then by ease, and ties only what is equal on both ("1224")', () => {
    const rows = rankByMatrix(
      [
        { optionId: 'a', y: 4, x: 3 },
        { optionId: 'b', y: 6, x: 3 },
        { optionId: 'c', y: 4, x: 6 },
        { optionId: 'd', y: 4, x: 6 },
      ],
      'high',
      'low',
    );
    // Most impact 6 (split 3), most ease 6 (split 3): all impact high; a and b have x 3 = not many → effort high.
    expect(rows.map((r) => [r.optionId, r.rank, r.tied, r.xLevel])).toEqual([
      ['c', 1, true, 'low'],
      ['d', 1, true, 'low'],
      ['b', 3, false, 'high'],
      ['a', 4, false, 'high'],
    ]);
  });

  it('keeps the given order for a vote nobody voted on, sharing a rank but flagged as no tie (nobody chose them)', () => {
    const rows = rankByMatrix([{ optionId: 'x', y: 0, x: 0 }, { optionId: 'y', y: 0, x: 0 }], 'high', 'low');
    expect(rows.map((r) => [r.optionId, r.rank, r.tied])).toEqual([
      ['x', 1, false],
      ['y', 1, false],
    ]);
    // Equal dots that are not nothing still tie.
    expect(rankByMatrix([{ optionId: 'x', y: 2, x: 1 }, { optionId: 'y', y: 2, x: 1 }], 'high', 'low').map((r) => r.tied)).toEqual([true, true]);
  });

  it('refuses dots that are not finite numbers', () => {
    expect(() => rankByMatrix([{ optionId: 'x', y: Number.POSITIVE_INFINITY, x: 0 }], 'high', 'low')).toThrow(RangeError);
  });
});

describe('what each criterion says on the phone', () => {
  it("says what a dot means: Cairn's default for impact and effort, the facilitator's own wording otherwise", () => {
    const [impact, effort] = IMPACT_EFFORT_CRITERIA;
    expect(`${effort!.label}: ${dotMeaning(effort!)}`).toBe('Effort: a dot for each idea that would be easy to do');
    expect(effort!.dotMeans).toBe('low');
    expect(impact!.dotMeans).toBe('high');
    expect(dotMeaning({ label: 'Cost', dotMeans: 'low' })).toBe('a dot for each idea with little cost');
    expect(dotMeaning({ label: 'Joy' })).toBe('a dot for each idea with a lot of joy');
    expect(dotMeaning({ label: 'Effort', hint: '  a dot for what we could do next week ', dotMeans: 'low' })).toBe('a dot for what we could do next week');
  });

  it('names the ranking and the quadrants the same way for every screen', () => {
    const criteria = [...IMPACT_EFFORT_CRITERIA];
    expect(rankingName({ rankBy: 'matrix', criteria })).toBe('the matrix: Impact high and Effort low first');
    expect(rankingName({ rankBy: 'overall', criteria })).toBe('all criteria together');
    expect(rankingName({ rankBy: 'effort', criteria })).toBe('Effort');
    expect(rankingName({ rankBy: 'overall', criteria: [] })).toBe('dots');
    expect(quadrantName('Impact', 'high', 'Effort', 'low')).toBe('Impact high · Effort low');
  });

  it('accepts the matrix ranking only with two criteria or more', () => {
    const base = { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, topN: 2, method: 'schulze' as const };
    expect(VoteRules.safeParse({ ...base, criteria: [...IMPACT_EFFORT_CRITERIA], rankBy: 'matrix' }).success).toBe(true);
    expect(VoteRules.safeParse({ ...base, criteria: [IMPACT_EFFORT_CRITERIA[0]], rankBy: 'matrix' }).success).toBe(false);
    expect(VoteRules.safeParse({ ...base, criteria: [{ id: 'matrix', label: 'Matrix' }, IMPACT_EFFORT_CRITERIA[0]], rankBy: 'overall' }).success).toBe(false);
  });
});

describe('plotPosition: the plot reads high impact at the top and low effort at the left', () => {
  // Common practice (the usual impact/effort matrix, CHECKS.md "high impact & low effort first"): impact
  // runs up, effort runs across from low at the left to high at the right, so the "quick wins" quadrant
  // (high impact, low effort) is the top left. 0 is the low end of an axis, 1 the high end.
  it('puts a quick win top left when a dot on effort means "easy to do"', () => {
    // Most impact dots 4, most "easy" dots 5. A welcome ride: impact 4, easy 5 → top (1), left (0).
    expect(plotPosition(4, 4, 'high')).toBe(1);
    expect(plotPosition(5, 5, 'low')).toBe(0);
    // No "easy" dots: effort high, at the right.
    expect(plotPosition(0, 5, 'low')).toBe(1);
  });

  it('puts an option with many effort dots at the right when a dot on effort means "a lot of effort"', () => {
    expect(plotPosition(3, 3, 'high')).toBe(1);
    expect(plotPosition(0, 3, 'high')).toBe(0);
  });

  it('agrees with the quadrant names: above the middle is exactly levelOf\'s "high"', () => {
    for (const means of ['high', 'low'] as const) {
      for (let most = 0; most <= 6; most++) {
        for (let dots = 0; dots <= most; dots++) {
          const pos = plotPosition(dots, most, means);
          if (pos !== 0.5) expect(pos > 0.5 ? 'high' : 'low', `${dots}/${most} ${means}`).toBe(levelOf(dots, most, means));
        }
      }
    }
    // The quadrant placed top left is the first in the ranking's order: high impact, low effort.
    expect(QUADRANT_ORDER[0]).toEqual({ y: 'high', x: 'low' });
  });

  it('refuses dots that are not finite numbers', () => {
    expect(() => plotPosition(Number.NaN, 3, 'high')).toThrow(RangeError);
  });
});
