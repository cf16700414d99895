import { existsSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { ACTIVITY_LIBRARY, VOTE_KINDS } from '../../shared/activities';
import { BALLOTS } from '../../src/components/voting/ballots';

// Cairn's own rule (no outside reference): every kind of vote in the activity library has a ballot on the phone.
describe('the ballots of the phone', () => {
  it('has a ballot component for every vote kind the activity library declares', () => {
    const kinds = Object.values(ACTIVITY_LIBRARY).flatMap((d) => (d.vote ? [d.vote] : []));
    expect(kinds.sort()).toEqual([...VOTE_KINDS].sort());
    expect(Object.keys(BALLOTS).sort()).toEqual([...VOTE_KINDS].sort());
    for (const kind of kinds) {
      expect(existsSync(new URL(`../../src/components/voting/${BALLOTS[kind].component}.vue`, import.meta.url)), kind).toBe(true);
    }
  });

  it('ranks for a preference vote and a team sort, spends dots for a dot vote', () => {
    expect(BALLOTS.dot_vote).toEqual({ component: 'DotBallot', ranked: false });
    expect(BALLOTS.preference_vote).toEqual({ component: 'RankBallot', ranked: true });
    expect(BALLOTS.team_sort).toEqual({ component: 'RankBallot', ranked: true });
  });
});
