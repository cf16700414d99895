/**
 * Team sizes that work in a design workshop: 3 to 7 people, ideally 5, at most 4 teams in one room
 * (common practice, from university design-thinking guides: teams of 3–7, ideally 5; at most 4
 * teams in a room, one facilitator for every 2 teams).
 */
export const TEAM_SIZE = { min: 3, max: 7, ideal: 5, maxTeams: 4 } as const;

/**
 * How many teams the console suggests: the teams already formed (so forming again keeps them), else
 * the plan's number of teams, else about one team per five people, at most four (common practice).
 * @example suggestTeamCount({ people: 5, planned: 3, current: 0 }) // 3
 */
export function suggestTeamCount(opts: { people: number; planned?: number | null; current?: number }): number {
  if (opts.current && opts.current > 0) return opts.current;
  if (opts.planned && opts.planned > 0) return opts.planned;
  return Math.max(1, Math.min(TEAM_SIZE.maxTeams, Math.round(opts.people / TEAM_SIZE.ideal)));
}

/** A team whose size falls outside what works, and the team it could merge into. */
export type TeamSizeWarning = { index: number; size: number; problem: 'small' | 'large'; mergeInto: number | null };

/**
 * The teams (by index) that fall outside 3–7 people; a small team gets the smallest other team to merge
 * into (when the two together stay within 7), so the console can offer it in one tap.
 * @example teamSizeWarnings([2, 2, 1]) // [{ index: 0, size: 2, problem: 'small', mergeInto: 2 }, …]
 */
export function teamSizeWarnings(sizes: readonly number[]): TeamSizeWarning[] {
  const out: TeamSizeWarning[] = [];
  sizes.forEach((size, index) => {
    if (size > TEAM_SIZE.max) {
      out.push({ index, size, problem: 'large', mergeInto: null });
      return;
    }
    if (size >= TEAM_SIZE.min) return;
    let mergeInto: number | null = null;
    sizes.forEach((other, j) => {
      if (j === index || size + other > TEAM_SIZE.max) return;
      if (mergeInto === null || other < sizes[mergeInto]!) mergeInto = j;
    });
    out.push({ index, size, problem: 'small', mergeInto });
  });
  return out;
}

/**
 * Merges team `from` into team `into`: member lists by index, the merged team leaves the list.
 * @example mergeTeams([['a'], ['b', 'c']], 0, 1) // [['b', 'c', 'a']]
 */
export function mergeTeams<T>(teams: readonly (readonly T[])[], from: number, into: number): T[][] {
  if (from === into || !teams[from] || !teams[into]) throw new RangeError('Merge one team into another');
  return teams.flatMap((members, i) => (i === from ? [] : i === into ? [[...members, ...teams[from]!]] : [[...members]]));
}
