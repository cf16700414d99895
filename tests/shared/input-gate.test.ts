import { describe, expect, it } from 'vitest';
import { inputRefusal, runningItemId } from '../../shared/input-gate';

// The rule is Cairn's own (the product brief: phones send input to the current item while the session
// is live and input is not locked); these checks pin it, with every refusal in its order of precedence.
const live = { status: 'live' as const, locked: false, runs: [{ itemId: 'a', endedAt: 1 }, { itemId: 'b', endedAt: null }] };

describe('the input gate', () => {
  it('lets a participant in a live, unlocked session send input to the item running now', () => {
    expect(inputRefusal(live, true, 'b')).toBeNull();
    expect(inputRefusal(live, true)).toBeNull();
  });

  it('refuses, in this order: not in the session, session ended, input locked, not the current item', () => {
    const ended = { ...live, status: 'ended' as const, locked: true };
    expect(inputRefusal(ended, false, 'a')).toBe('not_in_session');
    expect(inputRefusal(ended, true, 'a')).toBe('session_ended');
    expect(inputRefusal({ ...live, locked: true }, true, 'a')).toBe('input_locked');
    expect(inputRefusal(live, true, 'a')).toBe('not_current');
  });

  it('finds the running item from the open run only', () => {
    expect(runningItemId(live.runs)).toBe('b');
    expect(runningItemId([{ itemId: 'a', endedAt: 5 }])).toBeNull();
    expect(runningItemId([])).toBeNull();
    expect(inputRefusal({ ...live, runs: [] }, true, 'a')).toBe('not_current');
  });
});
