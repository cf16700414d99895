/**
 * The live session's transitions, as pure functions: moving through the agenda (next, back, go to an
 * item) and the shared countdown (start, pause, resume, add or take time, end). The server applies them
 * inside the write that stores the session; times are passed in (the server's clock).
 */
import { remainingMs, type Timer } from './clock';
import { runningItemId } from './input-gate';
import { because, type Why } from './reasons';

/** A run of an agenda item: when it started and, once the room moved on, when it ended. */
export type Run = { itemId: string; startedAt: number; endedAt: number | null };

/** A transition's answer: the new value, nothing to change (the command was already done), or why it is refused. */
export type Transition<T> = { next: T } | { unchanged: true } | { refused: 'conflict' | 'bad_request'; message: string; why: Why };

/** Where a move goes: the next item, the previous one, or any item by its place (0 is the first). */
export type MoveTarget = { to: 'next' } | { to: 'back' } | { to: 'index'; index: number };

/**
 * A timer stopped before its first start, showing the whole timebox of an item (minutes; none is 0).
 * @example idleTimer(5) // { status: 'idle', endsAt: null, remainingMs: null, durationMs: 300_000 }
 */
export function idleTimer(timeboxMin: number | undefined): Timer {
  return { status: 'idle', endsAt: null, remainingMs: null, durationMs: (timeboxMin ?? 0) * 60_000 };
}

/**
 * The current item's place: where its open run's item sits in the agenda now (so reordering the plan
 * during the day does not change what is running), else the stored place, kept inside the agenda.
 * @example currentIndexOf([{ itemId: 'b', startedAt: 0, endedAt: null }], 0, ['a', 'b']) // 1
 */
export function currentIndexOf(runs: readonly Run[], storedIndex: number, agendaIds: readonly string[]): number {
  const running = runningItemId(runs);
  const at = running === null ? -1 : agendaIds.indexOf(running);
  if (at >= 0) return at;
  return Math.max(0, Math.min(storedIndex, agendaIds.length - 1));
}

/**
 * Where a move from the item at `from` of an agenda of `count` items lands; past either end, or to a place
 * the agenda does not have, it is refused. Going to the current item is allowed (it restarts it).
 * @example moveTarget(2, 5, { to: 'next' }) // { next: 3 }
 */
export function moveTarget(from: number, count: number, target: MoveTarget): Transition<number> {
  if (target.to === 'next') {
    return from + 1 >= count ? { refused: 'conflict', message: 'This is the last item of the agenda', why: because('last_item') } : { next: from + 1 };
  }
  if (target.to === 'back') return from <= 0 ? { refused: 'conflict', message: 'This is the first item of the agenda', why: because('first_item') } : { next: from - 1 };
  if (target.index >= count) return { refused: 'bad_request', message: `The agenda has ${count} items; there is no item ${target.index + 1}`, why: because('no_such_item', { count, number: target.index + 1 }) };
  return { next: target.index };
}

/**
 * The runs and the timer after the room moves to an item at `now`: the open run ends, the item's run
 * starts, and its countdown waits, idle, with its whole timebox.
 * @example moveTo([{ itemId: 'a', startedAt: 0, endedAt: null }], { id: 'b', timeboxMin: 5 }, 60_000).runs.length // 2
 */
export function moveTo(runs: readonly Run[], item: { id: string; timeboxMin: number }, now: number): { runs: Run[]; timer: Timer } {
  return {
    runs: [...runs.map((r) => (r.endedAt === null ? { ...r, endedAt: now } : r)), { itemId: item.id, startedAt: now, endedAt: null }],
    timer: idleTimer(item.timeboxMin),
  };
}

/** A timer running from `now` with `leftMs` to go. */
function runningTimer(timer: Timer, now: number, leftMs: number): Timer {
  return { status: 'running', endsAt: now + leftMs, remainingMs: null, durationMs: timer.durationMs };
}

/**
 * Starts the countdown: the whole timebox from idle, what was left when paused; a running timer with
 * time left carries on unchanged (one that has run out starts its timebox again).
 * @example startTimer(idleTimer(5), 1_000) // { next: { status: 'running', endsAt: 301_000, … } }
 */
export function startTimer(timer: Timer, now: number): Transition<Timer> {
  if (timer.status === 'running' && remainingMs(timer, now) > 0) return { unchanged: true };
  const left = timer.status === 'paused' ? remainingMs(timer, now) : timer.durationMs;
  return { next: runningTimer(timer, now, left) };
}

/**
 * Pauses a running countdown, keeping what is left; pausing a paused one changes nothing.
 * @example pauseTimer({ status: 'running', endsAt: 10_000, remainingMs: null, durationMs: 60_000 }, 4_000) // { next: { status: 'paused', remainingMs: 6_000, … } }
 */
export function pauseTimer(timer: Timer, now: number): Transition<Timer> {
  if (timer.status === 'paused') return { unchanged: true };
  if (timer.status !== 'running') return { refused: 'conflict', message: 'The timer is not running', why: because('timer_not_running') };
  return { next: { status: 'paused', endsAt: null, remainingMs: remainingMs(timer, now), durationMs: timer.durationMs } };
}

/**
 * Resumes a paused countdown from what was left (an idle one starts with its timebox); a running one carries on.
 * @example resumeTimer({ status: 'paused', endsAt: null, remainingMs: 6_000, durationMs: 60_000 }, 20_000) // { next: { status: 'running', endsAt: 26_000, … } }
 */
export function resumeTimer(timer: Timer, now: number): Transition<Timer> {
  if (timer.status === 'running') return { unchanged: true };
  if (timer.status === 'ended') return { refused: 'conflict', message: 'The timer has ended', why: because('timer_ended') };
  return { next: runningTimer(timer, now, remainingMs(timer, now)) };
}

/**
 * Adds (or with a negative delta takes) time on the countdown, idle, running or paused: what is left
 * never goes below 0, an overrun timer given a minute has one minute again, and the timebox grows and
 * shrinks with it but never below what is left (so a progress ring stays within 100 %).
 * @example adjustTimer(idleTimer(5), 60_000, 0) // { next: { status: 'idle', durationMs: 360_000, … } }
 */
export function adjustTimer(timer: Timer, deltaMs: number, now: number): Transition<Timer> {
  if (timer.status === 'ended') return { refused: 'conflict', message: 'The timer has ended', why: because('timer_ended') };
  const left = Math.max(0, remainingMs(timer, now) + deltaMs);
  const durationMs = Math.max(left, timer.durationMs + deltaMs);
  if (timer.status === 'running') return { next: { status: 'running', endsAt: now + left, remainingMs: null, durationMs } };
  if (timer.status === 'paused') return { next: { status: 'paused', endsAt: null, remainingMs: left, durationMs } };
  return { next: { status: 'idle', endsAt: null, remainingMs: null, durationMs: left } };
}

/**
 * The countdown and the runs when the session ends at `now`: the timer stops for good, keeping its
 * timebox, and the open run ends.
 * @example endSession(idleTimer(5), [], 0).timer.status // 'ended'
 */
export function endSession(timer: Timer, runs: readonly Run[], now: number): { timer: Timer; runs: Run[] } {
  return {
    timer: { status: 'ended', endsAt: null, remainingMs: null, durationMs: timer.durationMs },
    runs: runs.map((r) => (r.endedAt === null ? { ...r, endedAt: now } : r)),
  };
}
