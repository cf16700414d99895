import { describe, expect, it } from 'vitest';
import munkres from 'munkres-js';
import { type TeamSortParticipant, hungarian, sortIntoTeams, teamSizes } from '../../shared/team-sort';
import { mulberry32 } from './random';

/** The total of the munkres-js package's assignment (an independent implementation). */
function munkresTotal(cost: number[][]): number {
  const columns = cost[0]?.length ?? 0;
  return munkres(cost)
    .filter(([r, c]) => r < cost.length && c < columns)
    .reduce((sum, [r, c]) => sum + cost[r][c], 0);
}

/** The cheapest assignment by trying every one (small matrices only). */
function bruteForce(cost: number[][]): number {
  const columns = cost[0]?.length ?? 0;
  const used = new Array<boolean>(columns).fill(false);
  const best = (row: number): number => {
    if (row === cost.length) return 0;
    let min = Infinity;
    for (let c = 0; c < columns; c++) {
      if (used[c]) continue;
      used[c] = true;
      min = Math.min(min, cost[row][c] + best(row + 1));
      used[c] = false;
    }
    return min;
  };
  return best(0);
}

/** Checks an assignment is one column per row, no column twice, and that `total` is its cost. */
function expectValid(cost: number[][], { assignment, total }: { assignment: number[]; total: number }): void {
  const real = assignment.filter((c) => c >= 0);
  expect(new Set(real).size).toBe(real.length);
  expect(real.length).toBe(Math.min(cost.length, cost[0]?.length ?? 0));
  expect(assignment.reduce((sum, c, r) => sum + (c >= 0 ? cost[r][c] : 0), 0)).toBeCloseTo(total, 9);
}

describe('hungarian', () => {
  it('solves the Wikipedia worked example (Alice 8 4 7, Bob 5 2 3, Carol 9 4 8): total 15', () => {
    // Wikipedia, "Hungarian algorithm": bathroom, floors, windows; minimum total 15.
    const cost = [
      [8, 4, 7],
      [5, 2, 3],
      [9, 4, 8],
    ];
    const result = hungarian(cost);
    expect(result.total).toBe(15);
    expectValid(cost, result);
    // The only assignment of cost 15: Alice bathroom, Bob windows, Carol floors.
    expect(result.assignment).toEqual([0, 2, 1]);
  });

  it('solves the Python munkres documentation matrix: total 12', () => {
    // Python `munkres` documentation: [[5,9,1],[10,3,2],[8,7,4]] has two optimal assignments of total 12.
    const cost = [
      [5, 9, 1],
      [10, 3, 2],
      [8, 7, 4],
    ];
    const result = hungarian(cost);
    expect(result.total).toBe(12);
    expectValid(cost, result);
  });

  it('handles fewer rows than columns, and pads more rows than columns (leftover rows get −1)', () => {
    const wide = [
      [7, 3, 9, 1],
      [2, 8, 6, 4],
    ];
    expect(hungarian(wide)).toEqual({ assignment: [3, 0], total: 3 });
    const tall = [
      [7, 2],
      [3, 8],
      [9, 6],
      [1, 4],
    ];
    expect(hungarian(tall)).toEqual({ assignment: [1, -1, -1, 0], total: 3 });
    expect(hungarian([])).toEqual({ assignment: [], total: 0 });
  });

  it('refuses ragged or non-finite matrices', () => {
    expect(() => hungarian([[1, 2], [3]])).toThrow(RangeError);
    expect(() => hungarian([[1, Infinity]])).toThrow(RangeError);
  });

  it('agrees with brute force on small random rectangular matrices', () => {
    const random = mulberry32(7);
    for (let k = 0; k < 200; k++) {
      const rows = 1 + Math.floor(random() * 6);
      const columns = 1 + Math.floor(random() * 6);
      const cost = Array.from({ length: rows }, () => Array.from({ length: columns }, () => Math.floor(random() * 20)));
      const result = hungarian(cost);
      expectValid(cost, result);
      const best = rows <= columns ? bruteForce(cost) : bruteForce(cost[0].map((_, c) => cost.map((row) => row[c])));
      expect(result.total, JSON.stringify(cost)).toBe(best);
    }
  });

  it('agrees with the munkres-js package on random square matrices up to 40 × 40', () => {
    const random = mulberry32(42);
    for (let k = 0; k < 60; k++) {
      const n = 1 + Math.floor(random() * 40);
      const cost = Array.from({ length: n }, () => Array.from({ length: n }, () => Math.floor(random() * 100)));
      const result = hungarian(cost);
      expectValid(cost, result);
      expect(result.total).toBe(munkresTotal(cost));
    }
  });
});

describe('teamSizes', () => {
  it('splits people as evenly as possible, larger teams first', () => {
    expect(teamSizes(18, 3)).toEqual([6, 6, 6]);
    expect(teamSizes(18, 4)).toEqual([5, 5, 4, 4]);
    expect(teamSizes(7, 3)).toEqual([3, 2, 2]);
    expect(teamSizes(2, 3)).toEqual([1, 1, 0]);
    expect(teamSizes(5, 0)).toEqual([]);
  });

  it('always sums to the people and differs by at most one', () => {
    for (let people = 0; people <= 60; people++) {
      for (let teams = 1; teams <= 12; teams++) {
        const sizes = teamSizes(people, teams);
        expect(sizes).toHaveLength(teams);
        expect(sizes.reduce((a, b) => a + b, 0)).toBe(people);
        expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
      }
    }
  });
});

describe('sortIntoTeams', () => {
  it('gives everyone their first choice when the first choices are balanced', () => {
    const participants = [
      { id: 'p1', ranking: ['bikes', 'app', 'signs'] },
      { id: 'p2', ranking: ['app', 'bikes', 'signs'] },
      { id: 'p3', ranking: ['signs', 'app', 'bikes'] },
      { id: 'p4', ranking: ['bikes', 'signs', 'app'] },
      { id: 'p5', ranking: ['app', 'signs', 'bikes'] },
      { id: 'p6', ranking: ['signs', 'bikes', 'app'] },
    ];
    const result = sortIntoTeams(participants, ['bikes', 'app', 'signs']);
    expect(result.teams).toEqual({ bikes: ['p1', 'p4'], app: ['p2', 'p5'], signs: ['p3', 'p6'] });
    expect(result.cost).toBe(0);
    expect(result.outcome.every((o) => o.choice === 1)).toBe(true);
  });

  it('keeps teams balanced when everyone wants the same challenge, and reports each choice', () => {
    const participants = ['a', 'b', 'c', 'd'].map((id) => ({ id, ranking: ['x', 'y'] }));
    const result = sortIntoTeams(participants, ['x', 'y']);
    expect(result.teams.x).toHaveLength(2);
    expect(result.teams.y).toHaveLength(2);
    expect(result.cost).toBe(2);
    expect(result.outcome.map((o) => o.choice).sort()).toEqual([1, 1, 2, 2]);
  });

  it('gives the larger teams to the most-wanted challenges', () => {
    // 7 people, 3 challenges: sizes 3, 2, 2; 'late' has the lowest total preference cost.
    const participants = [
      { id: 'p1', ranking: ['late', 'early', 'mid'] },
      { id: 'p2', ranking: ['late', 'mid', 'early'] },
      { id: 'p3', ranking: ['late', 'early', 'mid'] },
      { id: 'p4', ranking: ['mid', 'late', 'early'] },
      { id: 'p5', ranking: ['early', 'late', 'mid'] },
      { id: 'p6', ranking: ['late', 'mid', 'early'] },
      { id: 'p7', ranking: ['mid', 'early', 'late'] },
    ];
    const result = sortIntoTeams(participants, ['early', 'mid', 'late']);
    expect(result.teams.late).toHaveLength(3);
    expect(result.teams.early).toHaveLength(2);
    expect(result.teams.mid).toHaveLength(2);
  });

  it('costs an unranked challenge the number of challenges and reports it as choice 0', () => {
    const result = sortIntoTeams(
      [
        { id: 'p1', ranking: ['a'] },
        { id: 'p2', ranking: ['a', 'ghost', 'a'] },
      ],
      ['a', 'b'],
    );
    expect(result.cost).toBe(2);
    expect(result.outcome.find((o) => o.challengeId === 'b')?.choice).toBe(0);
  });

  it('makes empty teams for no participants and refuses no challenges', () => {
    expect(sortIntoTeams([], ['a', 'b'])).toEqual({ teams: { a: [], b: [] }, cost: 0, outcome: [] });
    expect(() => sortIntoTeams([{ id: 'p', ranking: [] }], [])).toThrow(RangeError);
  });

  it('agrees with munkres-js on random rooms up to 40 people × 6 teams, with sizes within one', () => {
    const random = mulberry32(2026);
    const pick = (n: number) => Math.floor(random() * n);
    for (let k = 0; k < 80; k++) {
      const challengeIds = Array.from({ length: 1 + pick(6) }, (_, i) => `c${i}`);
      const participants: TeamSortParticipant[] = Array.from({ length: pick(41) }, (_, i) => {
        const ranking = [...challengeIds];
        for (let j = ranking.length - 1; j > 0; j--) {
          const s = pick(j + 1);
          [ranking[j], ranking[s]] = [ranking[s], ranking[j]];
        }
        // Some participants rank only their favourites.
        return { id: `p${i}`, ranking: random() < 0.25 ? ranking.slice(0, pick(ranking.length + 1)) : ranking };
      });
      const result = sortIntoTeams(participants, challengeIds);

      const sizes = challengeIds.map((c) => result.teams[c].length);
      expect(sizes.reduce((a, b) => a + b, 0)).toBe(participants.length);
      expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
      expect(new Set(Object.values(result.teams).flat()).size).toBe(participants.length);

      // Cost of challenge c for a participant: its place in their ranking, or the number of challenges.
      const costOf = (p: TeamSortParticipant, c: string) =>
        p.ranking.includes(c) ? p.ranking.indexOf(c) : challengeIds.length;
      const choiceCost = (choice: number) => (choice === 0 ? challengeIds.length : choice - 1);
      expect(result.outcome.reduce((sum, o) => sum + choiceCost(o.choice), 0)).toBe(result.cost);
      if (participants.length === 0) continue;

      // Expand the same team sizes into slots and let munkres-js find the least total on its own.
      const slots = challengeIds.flatMap((c, i) => new Array<string>(sizes[i]).fill(c));
      const cost = participants.map((p) => slots.map((c) => costOf(p, c)));
      expect(result.cost, `instance ${k}`).toBe(munkresTotal(cost));
      const ours = result.outcome.reduce((sum, o, i) => sum + costOf(participants[i], o.challengeId), 0);
      expect(ours).toBe(result.cost);
    }
  });
});
