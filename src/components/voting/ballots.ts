import type { VoteKind } from '../../../shared/schemas/voting';

/** The ballot components a phone can show, by name (each a file of this folder). */
export type BallotName = 'DotBallot' | 'RankBallot';

/** The ballot a phone fills in for each kind of vote (the activity library's `vote` trait): dots to spend, or the options in order. */
export const BALLOTS: Record<VoteKind, { component: BallotName; ranked: boolean }> = {
  dot_vote: { component: 'DotBallot', ranked: false },
  preference_vote: { component: 'RankBallot', ranked: true },
  team_sort: { component: 'RankBallot', ranked: true },
};
