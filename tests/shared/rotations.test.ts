import { describe, expect, it } from 'vitest';
import {
  pairsForRound,
  partnerOf,
  roundRobin,
  roundRobinLength,
  testRotation,
  type RotationTeam,
} from '../../shared/rotations';

/** A pair as an order-free key, e.g. `3-6` for both [3, 6] and [6, 3]. */
const key = (a: number | string, b: number | string): string => [String(a), String(b)].sort().join('-');

/** A Berger table row as printed ("1-6 2-5 3-4") to a set of pair keys. */
const row = (text: string): Set<string> =>
  new Set(text.split(' ').map((pair) => key(...(pair.split('-') as [string, string]))));

describe('roundRobin', () => {
  // Berger tables, FIDE Handbook C.05 Annex 1 (copied as printed there, White first).
  const berger6 = ['1-6 2-5 3-4', '6-4 5-3 1-2', '2-6 3-1 4-5', '6-5 1-4 2-3', '3-6 4-2 5-1'];
  const berger8 = [
    '1-8 2-7 3-6 4-5',
    '8-5 6-4 7-3 1-2',
    '2-8 3-1 4-7 5-6',
    '8-6 7-5 1-4 2-3',
    '3-8 4-2 5-1 6-7',
    '8-7 1-6 2-5 3-4',
    '4-8 5-3 6-2 7-1',
  ];

  it.each([
    [6, berger6],
    [8, berger8],
  ])('matches the FIDE Berger table for %i players, round by round', (n, table) => {
    const { rounds } = roundRobin(n);
    expect(rounds.map((round) => new Set(round.pairs.map(([a, b]) => key(a, b))))).toEqual(table.map(row));
    expect(rounds.every((round) => round.rest === null)).toBe(true);
  });

  it('also keeps the FIDE table order and colours (White first)', () => {
    const printed = roundRobin(8).rounds.map((round) => round.pairs.map(([w, b]) => `${w}-${b}`).join(' '));
    expect(printed).toEqual(berger8);
  });

  it('for an odd count the highest number is the bye (FIDE Handbook C.05 Annex 1)', () => {
    // 5 players use the 6-player table; whoever meets 6 rests.
    const { rounds } = roundRobin(5);
    expect(rounds.map((round) => round.rest)).toEqual([1, 4, 2, 5, 3]);
    expect(rounds[0]).toEqual({ pairs: [[2, 5], [3, 4]], rest: 1 });
  });

  it.each(Array.from({ length: 19 }, (_, i) => i + 2))(
    'with %i players every pair meets exactly once, everyone once a round',
    (n) => {
      const { rounds } = roundRobin(n);
      expect(rounds).toHaveLength(n % 2 === 0 ? n - 1 : n);
      const met = new Map<string, number>();
      const rests = new Set<number>();
      for (const round of rounds) {
        const seen = round.pairs.flat();
        if (round.rest !== null) seen.push(round.rest);
        expect(seen.sort((a, b) => a - b)).toEqual(Array.from({ length: n }, (_, i) => i + 1));
        expect(round.rest === null).toBe(n % 2 === 0);
        if (round.rest !== null) rests.add(round.rest);
        for (const [a, b] of round.pairs) met.set(key(a, b), (met.get(key(a, b)) ?? 0) + 1);
      }
      expect(met.size).toBe((n * (n - 1)) / 2);
      expect([...met.values()].every((count) => count === 1)).toBe(true);
      // Odd counts: one rest a round, and each player rests exactly once.
      expect(rests.size).toBe(n % 2 === 0 ? 0 : n);
    },
  );

  it('handles nobody and one player, and refuses nonsense counts', () => {
    expect(roundRobin(0)).toEqual({ rounds: [] });
    expect(roundRobin(1)).toEqual({ rounds: [{ pairs: [], rest: 1 }] });
    expect(() => roundRobin(-1)).toThrow(RangeError);
    expect(() => roundRobinLength(2.5)).toThrow(RangeError);
  });
});

describe('pairsForRound and partnerOf', () => {
  const people = ['ana', 'ben', 'cy', 'dee', 'eli', 'fay'];

  it('numbers participants in the given order and follows the Berger table', () => {
    // FIDE Berger table for 6, round 2: 6-4 5-3 1-2.
    expect(pairsForRound(people, 1)).toEqual({
      pairs: [
        ['fay', 'dee'],
        ['eli', 'cy'],
        ['ana', 'ben'],
      ],
      resting: null,
    });
  });

  it('wraps the round index around after a full round-robin', () => {
    expect(pairsForRound(people, 5)).toEqual(pairsForRound(people, 0));
    expect(pairsForRound(people, 12)).toEqual(pairsForRound(people, 2));
    expect(pairsForRound(people, -1)).toEqual(pairsForRound(people, 4));
    const five = people.slice(0, 5);
    expect(pairsForRound(five, 5)).toEqual(pairsForRound(five, 0));
  });

  it('gives each person a new partner every round until they have met everyone', () => {
    for (const id of people) {
      const partners = Array.from({ length: 5 }, (_, round) => partnerOf(people, round, id));
      expect(new Set(partners)).toEqual(new Set(people.filter((other) => other !== id)));
    }
  });

  it('names who rests for an odd count, and partners are symmetric', () => {
    const five = people.slice(0, 5);
    const round = pairsForRound(five, 0);
    expect(round.resting).toBe('ana');
    expect(partnerOf(five, 0, 'ana')).toBeNull();
    for (const [a, b] of round.pairs) {
      expect(partnerOf(five, 0, a)).toBe(b);
      expect(partnerOf(five, 0, b)).toBe(a);
    }
    expect(partnerOf(five, 0, 'nobody')).toBeNull();
  });

  it('copes with nobody or one person, and refuses duplicate ids', () => {
    expect(pairsForRound([], 3)).toEqual({ pairs: [], resting: null });
    expect(pairsForRound(['ana'], 3)).toEqual({ pairs: [], resting: 'ana' });
    expect(() => pairsForRound(['ana', 'ana'], 0)).toThrow(RangeError);
    expect(() => pairsForRound(people, 0.5)).toThrow(RangeError);
  });
});

describe('testRotation', () => {
  // No published table exists for test rounds: these are Cairn's rules for test rounds
  // (never your own team; each team tested by as many others as possible), checked exhaustively.
  /** Teams of uneven sizes 2, 3, 4, … with members `t0m0`, `t0m1`, … */
  const teamsOf = (count: number): RotationTeam[] =>
    Array.from({ length: count }, (_, i) => ({
      id: `team${i}`,
      memberIds: Array.from({ length: 2 + ((i * 3) % 4) }, (_, m) => `t${i}m${m}`),
    }));

  const teamOf = (teams: RotationTeam[], memberId: string): string =>
    teams.find((team) => team.memberIds.includes(memberId))!.id;

  /** For each host team, the set of teams whose members tested it over all rounds. */
  const testedBy = (teams: RotationTeam[], rounds: ReturnType<typeof testRotation>): Map<string, Set<string>> => {
    const by = new Map(teams.map((team) => [team.id, new Set<string>()]));
    for (const round of rounds) {
      for (const visit of round.visits) by.get(visit.hostTeamId)!.add(teamOf(teams, visit.testerId));
    }
    return by;
  };

  it('follows the documented rule: round k, team i visits team (i + 1 + k mod (T − 1)) mod T', () => {
    const teams = teamsOf(4);
    const plan = testRotation(teams, 4);
    const hostOfTeam = (k: number, i: number): string =>
      plan[k].visits.find((v) => v.testerId === teams[i].memberIds[0])!.hostTeamId;
    expect([0, 1, 2, 3].map((k) => [0, 1, 2, 3].map((i) => hostOfTeam(k, i)))).toEqual([
      ['team1', 'team2', 'team3', 'team0'],
      ['team2', 'team3', 'team0', 'team1'],
      ['team3', 'team0', 'team1', 'team2'],
      ['team1', 'team2', 'team3', 'team0'], // repeats after T − 1 rounds
    ]);
    expect(plan.map((round) => round.round)).toEqual([0, 1, 2, 3]);
  });

  for (let t = 2; t <= 6; t++) {
    for (let rounds = 1; rounds <= 7; rounds++) {
      it(`${t} uneven teams, ${rounds} rounds: never own team, all visitors placed, min(R, T−1) testers each`, () => {
        const teams = teamsOf(t);
        const plan = testRotation(teams, rounds);
        expect(plan).toHaveLength(rounds);
        const everyone = teams.flatMap((team) => team.memberIds).sort();
        for (const round of plan) {
          // Every member tests exactly once a round, never their own team's prototype.
          expect(round.visits.map((v) => v.testerId).sort()).toEqual(everyone);
          for (const visit of round.visits) expect(visit.hostTeamId).not.toBe(teamOf(teams, visit.testerId));
          // Every team receives visitors every round.
          expect(new Set(round.visits.map((v) => v.hostTeamId))).toEqual(new Set(teams.map((team) => team.id)));
        }
        for (const testers of testedBy(teams, plan).values()) expect(testers.size).toBe(Math.min(rounds, t - 1));
      });
    }
  }

  it('split teams reach min(R·g, T − 1) other teams and each host gets g teams a round', () => {
    for (let t = 2; t <= 6; t++) {
      const teams = teamsOf(t); // smallest team has 2 members, so g ≤ 2
      for (let rounds = 1; rounds <= 4; rounds++) {
        const plan = testRotation(teams, rounds, { groupsPerTeam: 2 });
        const g = Math.min(2, t - 1);
        for (const round of plan) {
          for (const visit of round.visits) expect(visit.hostTeamId).not.toBe(teamOf(teams, visit.testerId));
          for (const team of teams) {
            const from = new Set(
              round.visits.filter((v) => v.hostTeamId === team.id).map((v) => teamOf(teams, v.testerId)),
            );
            expect(from.size).toBe(g);
          }
        }
        for (const testers of testedBy(teams, plan).values()) expect(testers.size).toBe(Math.min(rounds * g, t - 1));
      }
    }
  });

  it('leaves out teams without members and plans nothing with fewer than two teams', () => {
    const teams = [
      { id: 'a', memberIds: ['x'] },
      { id: 'empty', memberIds: [] },
      { id: 'b', memberIds: ['y', 'z'] },
    ];
    const plan = testRotation(teams, 2);
    expect(plan.flatMap((round) => round.visits).some((v) => v.hostTeamId === 'empty')).toBe(false);
    expect(plan[0].visits).toEqual([
      { testerId: 'x', hostTeamId: 'b' },
      { testerId: 'y', hostTeamId: 'a' },
      { testerId: 'z', hostTeamId: 'a' },
    ]);
    expect(testRotation([{ id: 'a', memberIds: ['x'] }], 2)).toEqual([
      { round: 0, visits: [] },
      { round: 1, visits: [] },
    ]);
    expect(testRotation([], 1)).toEqual([{ round: 0, visits: [] }]);
  });

  it('refuses nonsense input', () => {
    const teams = teamsOf(3);
    expect(() => testRotation(teams, -1)).toThrow(RangeError);
    expect(() => testRotation(teams, 1, { groupsPerTeam: 0 })).toThrow(RangeError);
    expect(() => testRotation([...teams, { id: 'x', memberIds: ['t0m0'] }], 1)).toThrow(RangeError);
  });
});
