/** A participant of a team sort with their challenges in order of preference (first = most wanted). */
export type TeamSortParticipant = { id: string; ranking: string[] };

/** Where one participant landed: `choice` is the challenge's place in their ranking (1 = first), 0 if unranked. */
export type TeamSortOutcome = { participantId: string; challengeId: string; choice: number };

/** The teams, one per challenge, the total preference cost, and each participant's outcome. */
export type TeamSortResult = {
  teams: Record<string, string[]>;
  cost: number;
  outcome: TeamSortOutcome[];
};

/**
 * Minimum-cost assignment of rows to columns (Hungarian algorithm with potentials, O(n²·m)).
 * With more rows than columns the matrix is padded with zero-cost columns and the rows left over get −1.
 * Costs must be finite numbers; `total` sums the real assignments.
 * @example hungarian([[8, 4, 7], [5, 2, 3], [9, 4, 8]]) // { assignment: [0, 2, 1], total: 15 }
 */
export function hungarian(cost: number[][]): { assignment: number[]; total: number } {
  const n = cost.length;
  if (n === 0) return { assignment: [], total: 0 };
  const columns = cost[0].length;
  for (const row of cost) {
    if (row.length !== columns) throw new RangeError('Every row of a cost matrix needs the same number of columns');
    if (!row.every(Number.isFinite)) throw new RangeError('Costs must be finite numbers');
  }
  const m = Math.max(n, columns);
  const a = (i: number, j: number): number => (j < columns ? cost[i][j] : 0);

  // 1-based potentials u (rows) and v (columns); match[j] is the row (1-based) holding column j, 0 if none.
  const u = new Array<number>(n + 1).fill(0);
  const v = new Array<number>(m + 1).fill(0);
  const match = new Array<number>(m + 1).fill(0);
  const way = new Array<number>(m + 1).fill(0);
  for (let i = 1; i <= n; i++) {
    match[0] = i;
    let j0 = 0;
    const minv = new Array<number>(m + 1).fill(Infinity);
    const used = new Array<boolean>(m + 1).fill(false);
    do {
      used[j0] = true;
      const i0 = match[j0];
      let delta = Infinity;
      let j1 = 0;
      for (let j = 1; j <= m; j++) {
        if (used[j]) continue;
        const reduced = a(i0 - 1, j - 1) - u[i0] - v[j];
        if (reduced < minv[j]) {
          minv[j] = reduced;
          way[j] = j0;
        }
        if (minv[j] < delta) {
          delta = minv[j];
          j1 = j;
        }
      }
      for (let j = 0; j <= m; j++) {
        if (used[j]) {
          u[match[j]] += delta;
          v[j] -= delta;
        } else {
          minv[j] -= delta;
        }
      }
      j0 = j1;
    } while (match[j0] !== 0);
    // Flip the augmenting path back to the root.
    do {
      const j1 = way[j0];
      match[j0] = match[j1];
      j0 = j1;
    } while (j0 !== 0);
  }

  const assignment = new Array<number>(n).fill(-1);
  let total = 0;
  for (let j = 1; j <= m; j++) {
    const i = match[j] - 1;
    if (i < 0 || j > columns) continue;
    assignment[i] = j - 1;
    total += cost[i][j - 1];
  }
  return { assignment, total };
}

/**
 * Team sizes as even as possible (they differ by at most one), larger teams first.
 * @example teamSizes(18, 4) // [5, 5, 4, 4]
 */
export function teamSizes(people: number, teams: number): number[] {
  if (teams <= 0) return [];
  const base = Math.floor(people / teams);
  const larger = people % teams;
  return Array.from({ length: teams }, (_, i) => (i < larger ? base + 1 : base));
}

/**
 * Sorts participants into one team per challenge: team sizes from {@link teamSizes}, least total
 * preference cost (the challenge's place in the participant's ranking, 0 for a first choice; a challenge
 * they did not rank costs the number of challenges), solved with {@link hungarian} over team slots.
 * The larger teams go to the most-wanted challenges: lowest total preference cost over all participants,
 * then the given challenge order. Teams list their members in the order participants were given.
 * @example sortIntoTeams([{ id: 'p1', ranking: ['c2', 'c1'] }], ['c1', 'c2']).teams // { c1: [], c2: ['p1'] }
 */
export function sortIntoTeams(participants: TeamSortParticipant[], challengeIds: string[]): TeamSortResult {
  if (challengeIds.length === 0) throw new RangeError('A team sort needs at least one challenge');
  const unranked = challengeIds.length;
  // preference[p][c]: cost of challenge c (index into challengeIds) for participant p.
  const challengeIndex = new Map(challengeIds.map((c, i) => [c, i]));
  const preference = participants.map(({ ranking }) => {
    const row = new Array<number>(challengeIds.length).fill(unranked);
    // Places count only the challenges on offer (unknown ids and repeats are skipped).
    let place = 0;
    for (const challengeId of ranking) {
      const c = challengeIndex.get(challengeId);
      if (c !== undefined && row[c] === unranked) row[c] = place++;
    }
    return row;
  });

  const demand = challengeIds.map((_, c) => preference.reduce((sum, row) => sum + row[c], 0));
  const mostWanted = challengeIds.map((_, c) => c).sort((x, y) => demand[x] - demand[y] || x - y);
  const sizes = teamSizes(participants.length, challengeIds.length);
  const slotChallenge: number[] = [];
  mostWanted.forEach((c, i) => {
    for (let s = 0; s < sizes[i]; s++) slotChallenge.push(c);
  });

  const { assignment, total } = hungarian(preference.map((row) => slotChallenge.map((c) => row[c])));
  const teams: Record<string, string[]> = Object.fromEntries(challengeIds.map((c) => [c, [] as string[]]));
  const outcome = participants.map(({ id }, p) => {
    const c = slotChallenge[assignment[p]];
    const challengeId = challengeIds[c];
    teams[challengeId].push(id);
    const place = preference[p][c];
    return { participantId: id, challengeId, choice: place === unranked ? 0 : place + 1 };
  });
  return { teams, cost: total, outcome };
}
