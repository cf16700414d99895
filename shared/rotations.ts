/**
 * Rotations: who meets whom in each round of an interview or icebreaker (round-robin pairs by the
 * Berger tables), and which team's prototype each tester visits in test rounds.
 *
 * Round indexes are 0-based everywhere in this file: index 0 is the first round (Berger round 1);
 * screens show `index + 1`.
 */

/** One round of a round-robin: the pairs that meet, and the player who rests (odd counts only). */
export interface RoundRobinRound {
  /** Pairs of player numbers; the first of each pair is White in the Berger table. */
  pairs: [number, number][];
  /** The player paired with the dummy (the bye) when the count is odd, otherwise `null`. */
  rest: number | null;
}

/** The pairs of one round of rotating partners, by participant id. */
export interface RoundPairs {
  pairs: [string, string][];
  /** Who sits this round out (odd counts only), otherwise `null`. */
  resting: string | null;
}

/** A team as test rounds see it: its id and its members' ids. */
export interface RotationTeam {
  id: string;
  memberIds: string[];
}

/** One tester's visit in a test round: whose prototype they test. */
export interface TestVisit {
  testerId: string;
  hostTeamId: string;
}

/** One test round: its 0-based index and every tester's visit. */
export interface TestRound {
  round: number;
  visits: TestVisit[];
}

/** Options of {@link testRotation}. */
export interface TestRotationOptions {
  /**
   * Into how many groups each team splits to visit that many different teams in one round
   * (default 1: the whole team moves together). Clamped to the smallest team's size and to the
   * number of other teams.
   */
  groupsPerTeam?: number;
}

function assertCount(value: number, name: string): void {
  if (!Number.isInteger(value) || value < 0) {
    throw new RangeError(`${name} must be a whole number of at least 0, got ${value}`);
  }
}

function assertDistinct(ids: readonly string[], what: string): void {
  if (new Set(ids).size !== ids.length) throw new RangeError(`${what} must be distinct`);
}

/**
 * How many rounds a full round-robin of `n` players takes: n − 1 for even n, n for odd n
 * (a dummy player makes the count even, and everyone rests once).
 * @example roundRobinLength(6) // 5
 */
export function roundRobinLength(n: number): number {
  assertCount(n, 'The number of players');
  return n % 2 === 0 ? Math.max(n - 1, 0) : n;
}

/**
 * One round of the Berger table for `n` players (0-based `index` < roundRobinLength(n)).
 *
 * With N = n rounded up to even and m = N − 1, Berger round r = index + 1 pairs N with the
 * player p where 2p ≡ r + 1 (mod m) — p = (r + 1)/2 for odd r, N/2 + r/2 for even r — and then,
 * board by board, p + b against p − b (mod m, numbered 1..m) for b = 1..N/2 − 1. This is the
 * FIDE table's own order and colours; a pair with the dummy N > n is the rest.
 */
function bergerRound(n: number, index: number): RoundRobinRound {
  const even = n % 2 === 0 ? n : n + 1;
  const m = even - 1;
  const r = index + 1;
  const p = r % 2 === 1 ? (r + 1) / 2 : even / 2 + r / 2;
  const wrap = (x: number): number => ((((x - 1) % m) + m) % m) + 1;

  const round: RoundRobinRound = { pairs: [], rest: null };
  const add = (white: number, black: number): void => {
    if (white > n) round.rest = black;
    else if (black > n) round.rest = white;
    else round.pairs.push([white, black]);
  };
  // Player N has White in even rounds and Black in odd rounds.
  if (r % 2 === 1) add(p, even);
  else add(even, p);
  for (let b = 1; b < even / 2; b++) add(wrap(p + b), wrap(p - b));
  return round;
}

/**
 * Every round of a round-robin of players 1..n by the Berger tables (FIDE Handbook C.05,
 * Annex 1): n − 1 rounds for even n; for odd n a dummy n + 1 is added, giving n rounds in which
 * the player drawn against the dummy rests.
 * @example roundRobin(4).rounds[0] // { pairs: [[1, 4], [2, 3]], rest: null }
 */
export function roundRobin(n: number): { rounds: RoundRobinRound[] } {
  const length = roundRobinLength(n);
  return { rounds: Array.from({ length }, (_, index) => bergerRound(n, index)) };
}

/**
 * The partner pairs of one round of rotating pairs (interviews, icebreakers): participant i
 * plays Berger number i + 1, and the round index wraps around after a full round-robin, so any
 * number of rounds can be run and nobody meets the same partner twice before meeting everyone.
 * @example pairsForRound(['ana', 'ben', 'cy'], 0) // { pairs: [['ben', 'cy']], resting: 'ana' }
 */
export function pairsForRound(participantIds: readonly string[], round: number): RoundPairs {
  if (!Number.isInteger(round)) throw new RangeError(`The round must be a whole number, got ${round}`);
  assertDistinct(participantIds, 'Participant ids');
  const length = roundRobinLength(participantIds.length);
  if (length === 0) return { pairs: [], resting: null };

  const { pairs, rest } = bergerRound(participantIds.length, ((round % length) + length) % length);
  const id = (player: number): string => participantIds[player - 1];
  return {
    pairs: pairs.map(([a, b]): [string, string] => [id(a), id(b)]),
    resting: rest === null ? null : id(rest),
  };
}

/**
 * The partner of `id` in a round of rotating pairs, or `null` when they rest or are not listed.
 * @example partnerOf(['ana', 'ben'], 0, 'ana') // 'ben'
 */
export function partnerOf(participantIds: readonly string[], round: number, id: string): string | null {
  for (const [a, b] of pairsForRound(participantIds, round).pairs) {
    if (a === id) return b;
    if (b === id) return a;
  }
  return null;
}

/**
 * Which team's prototype every tester visits in each of `rounds` test rounds.
 *
 * Rule: teams without members take no part (nobody built a prototype to host). With T teams
 * left, each splits into g groups (`groupsPerTeam`, default 1; members in the given order, group
 * sizes differing by at most one), and in round k group q of team i visits team
 * (i + s) mod T, where s = 1 + ((k·g + q) mod (T − 1)).
 *
 * Why it holds: s is never 0 mod T, so nobody tests their own team. A team's g groups use g
 * consecutive shifts mod (T − 1), all different, so in every round each team receives visitors
 * from g different teams (each group has a member because g ≤ the smallest team). Over R rounds
 * the shifts run through min(R·g, T − 1) different values, so each team is tested by
 * min(R·g, T − 1) different teams: with g = 1, by every other team in T − 1 rounds, after which
 * the rotation repeats.
 * @example testRotation([{ id: 'a', memberIds: ['x'] }, { id: 'b', memberIds: ['y'] }], 1)
 * // [{ round: 0, visits: [{ testerId: 'x', hostTeamId: 'b' }, { testerId: 'y', hostTeamId: 'a' }] }]
 */
export function testRotation(
  teams: readonly RotationTeam[],
  rounds: number,
  options: TestRotationOptions = {},
): TestRound[] {
  assertCount(rounds, 'The number of rounds');
  assertDistinct(teams.map((team) => team.id), 'Team ids');
  assertDistinct(teams.flatMap((team) => team.memberIds), 'Members (one team each)');

  const requested = options.groupsPerTeam ?? 1;
  if (!Number.isInteger(requested) || requested < 1) {
    throw new RangeError(`groupsPerTeam must be a whole number of at least 1, got ${requested}`);
  }

  const hosts = teams.filter((team) => team.memberIds.length > 0);
  const t = hosts.length;
  const smallest = Math.min(...hosts.map((team) => team.memberIds.length));
  const g = Math.min(requested, smallest, t - 1);

  return Array.from({ length: rounds }, (_, k): TestRound => {
    const visits: TestVisit[] = [];
    // With fewer than two teams there is no other prototype to test.
    if (t < 2) return { round: k, visits };
    hosts.forEach((team, i) => {
      const size = team.memberIds.length;
      team.memberIds.forEach((testerId, position) => {
        const group = Math.floor((position * g) / size);
        const shift = 1 + ((k * g + group) % (t - 1));
        visits.push({ testerId, hostTeamId: hosts[(i + shift) % t].id });
      });
    });
    return { round: k, visits };
  });
}
