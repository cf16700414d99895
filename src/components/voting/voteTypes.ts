import type { ActivityType } from '../../../shared/schemas/agenda-item';

/** The activity types whose screens are the voting components. */
export const VOTE_TYPES: ReadonlySet<ActivityType> = new Set(['dot_vote', 'preference_vote', 'team_sort']);
