/**
 * The one rule for a phone's input (a note, a photo, a dot, a ranking): a phone may send input to the
 * item running now only while the session is live and its input not locked by the facilitator, and
 * only while the participant is still in the session.
 */

/** Why a phone's input is refused; each has one message (the server's `errors.inputRefused`). */
export type InputRefusal = 'not_in_session' | 'session_ended' | 'input_locked' | 'not_current';

/** What the rule looks at of the live session, as read. */
export interface InputGateState {
  status: 'live' | 'ended';
  locked: boolean;
  /** The runs of the session's items; the last one still open is the item running now. */
  runs: readonly { itemId: string; endedAt: number | null }[];
}

/** The item running now: the one whose run is still open (a stopped session has none). */
export function runningItemId(runs: InputGateState['runs']): string | null {
  const last = runs.at(-1);
  return last && last.endedAt === null ? last.itemId : null;
}

/**
 * Whether a phone's input (to an item) is refused, and why; `inSession` says whether the participant is still in the session (`null`: let it through). Without an
 * `itemId` the item is not checked (a dot goes to the current vote, whichever item that is).
 * @example inputRefusal({ status: 'live', locked: true, runs: [] }, true) // 'input_locked'
 */
export function inputRefusal(state: InputGateState, inSession: boolean, itemId?: string): InputRefusal | null {
  if (!inSession) return 'not_in_session';
  if (state.status === 'ended') return 'session_ended';
  if (state.locked) return 'input_locked';
  if (itemId !== undefined && runningItemId(state.runs) !== itemId) return 'not_current';
  return null;
}
