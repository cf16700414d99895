import { describe, expect, it } from 'vitest';
import { storyKey, storyOwner } from '../../shared/activities';

// Cairn's own convention (no outside reference): a storyboard is kept under its team, or under its
// author with a `p:` prefix when the author had no team; the two functions are each other's inverse.
describe('the storyboard key', () => {
  it('is the team id for a team, p: and the author for someone without one', () => {
    expect(storyKey({ teamId: 't1', participantId: 'x1' })).toBe('t1');
    expect(storyKey({ teamId: null, participantId: 'x1' })).toBe('p:x1');
  });

  it('names its owner back', () => {
    expect(storyOwner(storyKey({ teamId: 't1', participantId: 'x1' }))).toEqual({ teamId: 't1' });
    expect(storyOwner(storyKey({ teamId: null, participantId: 'x1' }))).toEqual({ participantId: 'x1' });
  });
});
