import { describe, expect, it } from 'vitest';
import {
  adjustTimer,
  currentIndexOf,
  endSession,
  idleTimer,
  moveTarget,
  moveTo,
  pauseTimer,
  resumeTimer,
  startTimer,
  type Run,
} from '../../shared/live-moves';
import { remainingMs, type Timer } from '../../shared/clock';

// The countdown follows the usual stopwatch semantics of a kitchen or presentation timer (common practice,
// no published source): start runs the whole timebox, pause keeps what is left, resume runs from it. The
// times below are worked by hand in milliseconds.
const MIN = 60_000;
const running = (endsAt: number, durationMs = 5 * MIN): Timer => ({ status: 'running', endsAt, remainingMs: null, durationMs });
const paused = (left: number, durationMs = 5 * MIN): Timer => ({ status: 'paused', endsAt: null, remainingMs: left, durationMs });

describe('the countdown', () => {
  it('starts with the whole timebox from idle, and from what was left when paused', () => {
    expect(startTimer(idleTimer(5), 1_000)).toEqual({ next: running(1_000 + 5 * MIN) });
    expect(startTimer(paused(90_000), 10_000)).toEqual({ next: running(100_000) });
    // Running with time left: already started, nothing changes; run out: the timebox starts again.
    expect(startTimer(running(50_000), 10_000)).toEqual({ unchanged: true });
    expect(startTimer(running(50_000), 60_000)).toEqual({ next: running(60_000 + 5 * MIN) });
  });

  it('pauses keeping what is left, and resumes from it: 2 min run, 1 min paused, 3 min left (worked by hand)', () => {
    const t0 = 0;
    const started = (startTimer(idleTimer(5), t0) as { next: Timer }).next;
    const p = pauseTimer(started, t0 + 2 * MIN);
    expect(p).toEqual({ next: paused(3 * MIN) });
    const resumed = resumeTimer((p as { next: Timer }).next, t0 + 3 * MIN);
    expect(resumed).toEqual({ next: running(t0 + 6 * MIN) });
    expect(remainingMs((resumed as { next: Timer }).next, t0 + 3 * MIN)).toBe(3 * MIN);
  });

  it('refuses to pause a timer that is not running, and to resume or adjust an ended one', () => {
    expect(pauseTimer(idleTimer(5), 0)).toEqual({ refused: 'conflict', message: 'The timer is not running', why: { reason: 'timer_not_running' } });
    expect(pauseTimer(paused(1_000), 0)).toEqual({ unchanged: true });
    const ended: Timer = { status: 'ended', endsAt: null, remainingMs: null, durationMs: 5 * MIN };
    expect(resumeTimer(ended, 0)).toMatchObject({ refused: 'conflict' });
    expect(adjustTimer(ended, MIN, 0)).toMatchObject({ refused: 'conflict' });
    expect(resumeTimer(running(10_000), 0)).toEqual({ unchanged: true });
    // An idle timer resumes by starting with its timebox.
    expect(resumeTimer(idleTimer(2), 0)).toEqual({ next: running(2 * MIN, 2 * MIN) });
  });

  it('adds and takes time: never below 0 left, the timebox never below what is left, an overrun timer given a minute has one', () => {
    expect(adjustTimer(idleTimer(5), MIN, 0)).toEqual({ next: { status: 'idle', endsAt: null, remainingMs: null, durationMs: 6 * MIN } });
    expect(adjustTimer(running(2 * MIN), MIN, 0)).toEqual({ next: running(3 * MIN, 6 * MIN) });
    expect(adjustTimer(paused(30_000), -MIN, 0)).toEqual({ next: paused(0, 4 * MIN) });
    // Overrun by a minute (ended at 60 s, now 120 s): one minute from now, not zero.
    expect(adjustTimer(running(MIN), MIN, 2 * MIN)).toEqual({ next: running(3 * MIN, 6 * MIN) });
    // Taking more than the timebox leaves a timebox of what is left.
    expect(adjustTimer(idleTimer(1), -2 * MIN, 0)).toEqual({ next: { status: 'idle', endsAt: null, remainingMs: null, durationMs: 0 } });
  });
});

describe('moving through the agenda', () => {
  it('goes forward and back inside the agenda and refuses past either end', () => {
    expect(moveTarget(0, 3, { to: 'next' })).toEqual({ next: 1 });
    expect(moveTarget(2, 3, { to: 'next' })).toEqual({ refused: 'conflict', message: 'This is the last item of the agenda', why: { reason: 'last_item' } });
    expect(moveTarget(1, 3, { to: 'back' })).toEqual({ next: 0 });
    expect(moveTarget(0, 3, { to: 'back' })).toEqual({ refused: 'conflict', message: 'This is the first item of the agenda', why: { reason: 'first_item' } });
  });

  it('goes to any item, the current one included (it restarts), and refuses a place the agenda does not have', () => {
    expect(moveTarget(1, 3, { to: 'index', index: 1 })).toEqual({ next: 1 });
    expect(moveTarget(1, 3, { to: 'index', index: 3 })).toEqual({
      refused: 'bad_request',
      message: 'The agenda has 3 items; there is no item 4',
      why: { reason: 'no_such_item', params: { count: 3, number: 4 } },
    });
  });

  it('ends the open run and starts the item’s run, its countdown idle with its whole timebox', () => {
    const runs: Run[] = [
      { itemId: 'a', startedAt: 0, endedAt: 10 },
      { itemId: 'b', startedAt: 10, endedAt: null },
    ];
    expect(moveTo(runs, { id: 'c', timeboxMin: 15 }, 90)).toEqual({
      runs: [
        { itemId: 'a', startedAt: 0, endedAt: 10 },
        { itemId: 'b', startedAt: 10, endedAt: 90 },
        { itemId: 'c', startedAt: 90, endedAt: null },
      ],
      timer: idleTimer(15),
    });
    expect(runs[1]!.endedAt).toBeNull();
  });

  it('finds the current item by its open run even when the plan was reordered, else keeps the stored place inside the agenda', () => {
    const runs: Run[] = [{ itemId: 'b', startedAt: 0, endedAt: null }];
    expect(currentIndexOf(runs, 1, ['a', 'b', 'c'])).toBe(1);
    expect(currentIndexOf(runs, 1, ['b', 'a', 'c'])).toBe(0);
    // The running item was removed from the plan, or nothing runs: the stored place, kept inside the agenda.
    expect(currentIndexOf(runs, 5, ['a', 'c'])).toBe(1);
    expect(currentIndexOf([], -1, ['a'])).toBe(0);
  });

  it('ends the session: the countdown stops for good and the open run ends', () => {
    const end = endSession(running(MIN), [{ itemId: 'a', startedAt: 0, endedAt: null }], 500);
    expect(end).toEqual({ timer: { status: 'ended', endsAt: null, remainingMs: null, durationMs: 5 * MIN }, runs: [{ itemId: 'a', startedAt: 0, endedAt: 500 }] });
  });
});
