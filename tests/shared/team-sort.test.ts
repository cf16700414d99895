import { describe, expect, it } from 'vitest';
import munkres from 'munkres-js';
import { type TeamLayout, type TeamSortParticipant, hungarian, sortIntoTeams, teamBounds, teamSizes } from '../../shared/team-sort';
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

/** Cost of a challenge for a participant: its place in their ranking, or the number of challenges if unranked. */
function costOf(p: TeamSortParticipant, challengeIds: string[], c: string): number {
  return p.ranking.includes(c) ? p.ranking.indexOf(c) : challengeIds.length;
}

/** Participants with shuffled rankings; some rank only their favourites. */
function randomRoom(random: () => number, challengeIds: string[], people: number): TeamSortParticipant[] {
  const pick = (n: number) => Math.floor(random() * n);
  return Array.from({ length: people }, (_, i) => {
    const ranking = [...challengeIds];
    for (let j = ranking.length - 1; j > 0; j--) {
      const s = pick(j + 1);
      [ranking[j], ranking[s]] = [ranking[s], ranking[j]];
    }
    return { id: `p${i}`, ranking: random() < 0.25 ? ranking.slice(0, pick(ranking.length + 1)) : ranking };
  });
}

/**
 * The least total cost of a team sort by trying every way to put each participant in a team, kept when the
 * sizes fit the layout: by default sizes within one of each other (Cairn's rule: teams as even as possible); with a
 * largest size, every team between its smallest and largest size; with fixed sizes, exactly those.
 */
function exhaustive(participants: TeamSortParticipant[], challengeIds: string[], layout?: TeamLayout): number {
  const k = challengeIds.length;
  const sizes = new Array<number>(k).fill(0);
  const fits = () => {
    if (!layout) return Math.max(...sizes) - Math.min(...sizes) <= 1;
    if ('sizes' in layout) return sizes.every((s, c) => s === layout.sizes[c]);
    const min = layout.minTeamSize ?? Math.min(layout.maxTeamSize, Math.floor(participants.length / k));
    return sizes.every((s) => s >= min && s <= layout.maxTeamSize);
  };
  const best = (p: number): number => {
    if (p === participants.length) return fits() ? 0 : Infinity;
    let min = Infinity;
    for (let c = 0; c < k; c++) {
      sizes[c]++;
      min = Math.min(min, costOf(participants[p], challengeIds, challengeIds[c]) + best(p + 1));
      sizes[c]--;
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

  // Issue 13, first room: sizes handed out by total preference gave x a team of one and cost 2, with p3 on
  // a last choice; giving x the team of two costs 1 and nobody is worse than a second choice.
  it('finds the best balanced split: x, y, z with p0 y>z>x, p1 y>x>z, p2 x>y>z, p3 x>y>z costs 1', () => {
    const participants = [
      { id: 'p0', ranking: ['y', 'z', 'x'] },
      { id: 'p1', ranking: ['y', 'x', 'z'] },
      { id: 'p2', ranking: ['x', 'y', 'z'] },
      { id: 'p3', ranking: ['x', 'y', 'z'] },
    ];
    const result = sortIntoTeams(participants, ['x', 'y', 'z']);
    expect(result.cost).toBe(exhaustive(participants, ['x', 'y', 'z']));
    expect(result.cost).toBe(1);
    expect(result.teams).toEqual({ x: ['p2', 'p3'], y: ['p1'], z: ['p0'] });
    expect(Math.max(...result.outcome.map((o) => o.choice))).toBe(2);
  });

  // Issue 13, second room: p2 ranks only x; everyone can have a first choice.
  it('costs 0 for x, y with p0 y>x, p1 y>x and p2 ranking only x', () => {
    const participants = [
      { id: 'p0', ranking: ['y', 'x'] },
      { id: 'p1', ranking: ['y', 'x'] },
      { id: 'p2', ranking: ['x'] },
    ];
    const result = sortIntoTeams(participants, ['x', 'y']);
    expect(result.cost).toBe(0);
    expect(result.teams).toEqual({ x: ['p2'], y: ['p0', 'p1'] });
  });

  it('keeps the sizes the facilitator sets', () => {
    const participants = ['a', 'b', 'c', 'd', 'e'].map((id) => ({ id, ranking: ['x', 'y', 'z'] }));
    const result = sortIntoTeams(participants, ['x', 'y', 'z'], { sizes: [1, 1, 3] });
    expect([result.teams.x.length, result.teams.y.length, result.teams.z.length]).toEqual([1, 1, 3]);
    expect(result.cost).toBe(0 + 1 + 3 * 2);
  });

  it('holds the facilitator’s largest team size and lets the wanted challenge take the people left over', () => {
    // 10 people, 3 challenges, everyone wants x first: even sizes give x 4; a largest team of 5 lets x take
    // the one person left over beyond the even share of 3 (never more than 5).
    const participants = Array.from({ length: 10 }, (_, i) => ({ id: `p${i}`, ranking: ['x', 'y', 'z'] }));
    const even = sortIntoTeams(participants, ['x', 'y', 'z']);
    expect(even.teams.x).toHaveLength(4);
    const capped = sortIntoTeams(participants, ['x', 'y', 'z'], { maxTeamSize: 5 });
    expect(capped.teams.x).toHaveLength(4); // the even share 3 for y and z leaves 4
    const loose = sortIntoTeams(participants, ['x', 'y', 'z'], { maxTeamSize: 5, minTeamSize: 2 });
    expect(loose.teams.x).toHaveLength(5);
    expect(Math.max(...Object.values(loose.teams).map((t) => t.length))).toBeLessThanOrEqual(5);
    expect(loose.cost).toBe(exhaustive(participants.slice(0, 10), ['x', 'y', 'z'], { maxTeamSize: 5, minTeamSize: 2 }));
  });

  it('refuses layouts that do not fit the room, saying why', () => {
    const five = ['a', 'b', 'c', 'd', 'e'].map((id) => ({ id, ranking: ['x'] }));
    expect(() => sortIntoTeams(five, ['x', 'y'], { maxTeamSize: 2 })).toThrow('5 people do not fit in 2 teams of at most 2');
    expect(() => sortIntoTeams(five, ['x', 'y'], { sizes: [2, 2] })).toThrow('add up to 4, not the 5 people');
    expect(() => sortIntoTeams(five, ['x', 'y'], { sizes: [2, Number.NaN] })).toThrow(RangeError);
    expect(() => sortIntoTeams(five, ['x', 'y'], { maxTeamSize: Number.NaN })).toThrow('largest team size');
    expect(() => sortIntoTeams(five, ['x', 'y'], { maxTeamSize: 4, minTeamSize: 3 })).toThrow('cannot fill 2 teams of at least 3');
  });

  it('gives the least cost of every allowed layout on seeded random small rooms (exhaustive search)', () => {
    const random = mulberry32(13_0002);
    const pick = (n: number) => Math.floor(random() * n);
    let unevenBest = 0;
    for (let room = 0; room < 150; room++) {
      const challengeIds = Array.from({ length: 1 + pick(4) }, (_, i) => `c${i}`);
      const participants = randomRoom(random, challengeIds, pick(8));
      const layouts: (TeamLayout | undefined)[] = [undefined, { maxTeamSize: Math.ceil(participants.length / challengeIds.length) + pick(3), minTeamSize: pick(2) }];
      for (const layout of layouts) {
        let bounds: { min: number; max: number }[];
        try {
          bounds = teamBounds(participants.length, challengeIds.length, layout);
        } catch {
          continue;
        }
        const result = sortIntoTeams(participants, challengeIds, layout);
        const sizes = challengeIds.map((c) => result.teams[c].length);
        sizes.forEach((size, c) => {
          expect(size).toBeGreaterThanOrEqual(bounds[c].min);
          expect(size).toBeLessThanOrEqual(bounds[c].max);
        });
        expect(result.cost, `room ${room} ${JSON.stringify(layout)}`).toBe(exhaustive(participants, challengeIds, layout));
        if (layout && Math.max(...sizes) - Math.min(...sizes) > 1) unevenBest++;
      }
    }
    expect(unevenBest).toBeGreaterThan(5); // the draw reaches layouts beyond "within one"
  });

  it('matches munkres-js on the same expanded matrix for a 40 × 6 room', () => {
    const random = mulberry32(40_06);
    const challengeIds = Array.from({ length: 6 }, (_, i) => `c${i}`);
    for (const layout of [undefined, { maxTeamSize: 9 }] as (TeamLayout | undefined)[]) {
      const participants = randomRoom(random, challengeIds, 40);
      const result = sortIntoTeams(participants, challengeIds, layout);
      // The expanded matrix written from the description: each team ⌊n/k⌋ required seats (or its
      // smallest size), optional seats up to its largest size; dummy rows only in optional seats.
      const bounds = teamBounds(40, 6, layout);
      const seats = bounds.flatMap(({ min, max }, c) => Array.from({ length: max }, (_, s) => ({ c, required: s < min })));
      const big = 6 * 40 + 1;
      const matrix = [
        ...participants.map((p) => seats.map((seat) => costOf(p, challengeIds, challengeIds[seat.c]))),
        ...Array.from({ length: seats.length - 40 }, () => seats.map((seat) => (seat.required ? big : 0))),
      ];
      expect(result.cost).toBe(munkresTotal(matrix));
      expect(result.outcome.reduce((sum, o, i) => sum + costOf(participants[i], challengeIds, o.challengeId), 0)).toBe(result.cost);
      const sizes = challengeIds.map((c) => result.teams[c].length);
      expect(Math.max(...sizes)).toBeLessThanOrEqual(layout ? 9 : 7);
    }
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

      const choiceCost = (choice: number) => (choice === 0 ? challengeIds.length : choice - 1);
      expect(result.outcome.reduce((sum, o) => sum + choiceCost(o.choice), 0)).toBe(result.cost);
      if (participants.length === 0) continue;

      // For the sizes Cairn chose, munkres-js finds no cheaper assignment on its own.
      const slots = challengeIds.flatMap((c, i) => new Array<string>(sizes[i]).fill(c));
      const cost = participants.map((p) => slots.map((c) => costOf(p, challengeIds, c)));
      expect(result.cost, `instance ${k}`).toBe(munkresTotal(cost));
      const ours = result.outcome.reduce((sum, o, i) => sum + costOf(participants[i], challengeIds, o.challengeId), 0);
      expect(ours).toBe(result.cost);
    }
  });
});
