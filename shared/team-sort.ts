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
  if (!Number.isInteger(people) || people < 0) throw new RangeError(`People must be a whole number of 0 or more, not ${people}`);
  if (!Number.isInteger(teams)) throw new RangeError(`Teams must be a whole number, not ${teams}`);
  if (teams <= 0) return [];
  const base = Math.floor(people / teams);
  const larger = people % teams;
  return Array.from({ length: teams }, (_, i) => (i < larger ? base + 1 : base));
}

/**
 * Which team sizes a team sort may use: by default sizes that differ by at most one (which team is larger is
 * left to the room's preferences); `sizes` fixes every team's size (in challenge order); `maxTeamSize` caps
 * every team and lets the most wanted challenges take the people left over, no team falling below
 * `minTeamSize` (by default the even share, ⌊people ÷ teams⌋, or the cap if smaller).
 */
export type TeamLayout = { sizes: number[] } | { maxTeamSize: number; minTeamSize?: number };

/**
 * The smallest and largest size each team may take under a layout, checked: a RangeError says what does not fit.
 * @example teamBounds(7, 3) // [{ min: 2, max: 3 }, { min: 2, max: 3 }, { min: 2, max: 3 }]
 */
export function teamBounds(people: number, teams: number, layout?: TeamLayout): { min: number; max: number }[] {
  if (!Number.isInteger(people) || people < 0) throw new RangeError(`People must be a whole number of 0 or more, not ${people}`);
  if (!Number.isInteger(teams) || teams <= 0) throw new RangeError(`A team sort needs a whole number of teams, 1 or more, not ${teams}`);
  const whole = (n: number) => Number.isInteger(n) && n >= 0;
  if (layout && 'sizes' in layout) {
    if (layout.sizes.length !== teams) throw new RangeError(`Give one size for each of the ${teams} teams`);
    if (!layout.sizes.every(whole)) throw new RangeError(`Team sizes must be whole numbers of 0 or more: ${layout.sizes.join(', ')}`);
    const sum = layout.sizes.reduce((a, b) => a + b, 0);
    if (sum !== people) throw new RangeError(`The team sizes add up to ${sum}, not the ${people} people to sort`);
    return layout.sizes.map((size) => ({ min: size, max: size }));
  }
  if (layout && 'maxTeamSize' in layout) {
    const { maxTeamSize: max } = layout;
    if (!whole(max) || max === 0) throw new RangeError(`The largest team size must be a whole number of 1 or more, not ${max}`);
    const min = layout.minTeamSize ?? Math.min(max, Math.floor(people / teams));
    if (!whole(min) || min > max) throw new RangeError(`The smallest team size must be a whole number from 0 to ${max}, not ${min}`);
    if (max * teams < people) throw new RangeError(`${people} people do not fit in ${teams} teams of at most ${max}`);
    if (min * teams > people) throw new RangeError(`${people} people cannot fill ${teams} teams of at least ${min}`);
    return Array.from({ length: teams }, () => ({ min, max }));
  }
  const base = Math.floor(people / teams);
  return Array.from({ length: teams }, () => ({ min: base, max: people % teams === 0 ? base : base + 1 }));
}

/**
 * Sorts participants into one team per challenge with the least total preference cost over every layout
 * the {@link TeamLayout} allows (by default sizes that differ by at most one). The cost of a challenge is
 * its place in the participant's ranking (0 for a first choice); a challenge they did not rank costs the
 * number of challenges.
 *
 * One assignment solves it exactly: each team has `min` required seats and `max − min` optional seats;
 * dummy rows fill the seats nobody takes and may sit only in optional seats (0 there, a cost above any
 * real total in a required seat), so {@link hungarian} chooses the sizes and the members together.
 * Teams list their members in the order participants were given.
 * @example sortIntoTeams([{ id: 'p1', ranking: ['c2', 'c1'] }], ['c1', 'c2']).teams // { c1: [], c2: ['p1'] }
 */
export function sortIntoTeams(participants: TeamSortParticipant[], challengeIds: string[], layout?: TeamLayout): TeamSortResult {
  if (challengeIds.length === 0) throw new RangeError('A team sort needs at least one challenge');
  const k = challengeIds.length;
  const n = participants.length;
  const unranked = k;
  // preference[p][c]: cost of challenge c (index into challengeIds) for participant p.
  const challengeIndex = new Map(challengeIds.map((c, i) => [c, i]));
  const preference = participants.map(({ ranking }) => {
    const row = new Array<number>(k).fill(unranked);
    // Places count only the challenges on offer (unknown ids and repeats are skipped).
    let place = 0;
    for (const challengeId of ranking) {
      const c = challengeIndex.get(challengeId);
      if (c !== undefined && row[c] === unranked) row[c] = place++;
    }
    return row;
  });

  const bounds = teamBounds(n, k, layout);
  const sumMin = bounds.reduce((sum, b) => sum + b.min, 0);
  // No team can take more than the people the other teams' required seats leave over.
  const seats: { challenge: number; required: boolean }[] = [];
  bounds.forEach(({ min, max }, c) => {
    const most = Math.min(max, n - (sumMin - min));
    for (let s = 0; s < most; s++) seats.push({ challenge: c, required: s < min });
  });
  const dummies = seats.length - n;
  // Above any real total (every participant at the highest cost), so no optimum seats a dummy in a required seat.
  const forbidden = unranked * n + 1;
  const matrix = [
    ...preference.map((row) => seats.map((seat) => row[seat.challenge])),
    ...Array.from({ length: dummies }, () => seats.map((seat) => (seat.required ? forbidden : 0))),
  ];
  const { assignment } = hungarian(matrix);

  const teams: Record<string, string[]> = Object.fromEntries(challengeIds.map((c) => [c, [] as string[]]));
  let cost = 0;
  const outcome = participants.map(({ id }, p) => {
    const c = seats[assignment[p]].challenge;
    const challengeId = challengeIds[c];
    teams[challengeId].push(id);
    const place = preference[p][c];
    cost += place;
    return { participantId: id, challengeId, choice: place === unranked ? 0 : place + 1 };
  });
  return { teams, cost, outcome };
}
