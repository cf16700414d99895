/**
 * The shared countdown: the server owns a timer's end time, and each client estimates how far its
 * clock is from the server's with the NTP on-wire formulas (RFC 5905 §8), so every phone and the
 * projector show the same remaining second.
 */

import { finite } from './numbers';

/** One round trip's estimate: the server clock minus the client clock, and the round-trip delay. */
export interface ClockSample {
  /** θ: add it to the client's clock to get the server's (ms when the times are ms). */
  offset: number;
  /** δ: the round trip minus the server's own processing time. */
  delay: number;
}

/**
 * Offset and delay of one round trip by RFC 5905 §8: θ = ((T2 − T1) + (T3 − T4)) / 2,
 * δ = (T4 − T1) − (T3 − T2), with T1 the client's send time, T2 the server's receive time,
 * T3 the server's send time and T4 the client's receive time (each by its own clock).
 * Refuses a time that is not a finite number (RangeError naming it).
 * @example ntpSample(0, 60, 61, 21) // { offset: 50, delay: 20 }
 */
export function ntpSample(t1: number, t2: number, t3: number, t4: number): ClockSample {
  finite('T1', t1);
  finite('T2', t2);
  finite('T3', t3);
  finite('T4', t4);
  return { offset: (t2 - t1 + (t3 - t4)) / 2, delay: t4 - t1 - (t3 - t2) };
}

/**
 * The sample of least delay, whose offset error is at most δ/2 (the idea of RFC 5905's clock
 * filter); on equal delays the later sample wins, being fresher. Ignores garbled samples (an offset or
 * delay that is not a finite number, or a negative delay), as {@link ClockSync.add} does; `null` when
 * no usable sample is left.
 * @example bestSample([{ offset: 9, delay: 80 }, { offset: 5, delay: 12 }]) // { offset: 5, delay: 12 }
 */
export function bestSample<S extends ClockSample>(samples: readonly S[]): S | null {
  let best: S | null = null;
  for (const sample of samples) {
    if (!usable(sample)) continue;
    if (best === null || sample.delay <= best.delay) best = sample;
  }
  return best;
}

/** Whether a sample can be trusted at all: finite offset and delay, and a delay of 0 or more. */
function usable(sample: ClockSample): boolean {
  return Number.isFinite(sample.offset) && Number.isFinite(sample.delay) && sample.delay >= 0;
}

/**
 * A client's running estimate of the server clock from its latest round trips: keeps the last
 * {@link ClockSync.WINDOW} samples and trusts the one of least delay.
 * @example
 * const sync = new ClockSync();
 * sync.addRoundTrip(t1, t2, t3, Date.now());
 * serverNow(Date.now(), sync.offsetMs);
 */
export class ClockSync {
  /** How many of the latest samples are kept (RFC 5905's clock filter keeps 8). */
  static readonly WINDOW = 8;

  // A plain field, not `#samples`: a Vue reactive proxy around the instance cannot reach `#` fields.
  private kept: ClockSample[] = [];

  /** Adds one sample; a sample with a negative or non-finite delay is garbled and is ignored. */
  add(sample: ClockSample): boolean {
    if (!usable(sample)) return false;
    this.kept = [...this.kept, sample].slice(-ClockSync.WINDOW);
    return true;
  }

  /** Adds the sample of one round trip (see {@link ntpSample}) and returns it; ignores (and returns `null` for) a round trip with a time that is not a finite number. */
  addRoundTrip(t1: number, t2: number, t3: number, t4: number): ClockSample | null {
    if (![t1, t2, t3, t4].every(Number.isFinite)) return null;
    const sample = ntpSample(t1, t2, t3, t4);
    this.add(sample);
    return sample;
  }

  /** The kept samples, oldest first. */
  get samples(): readonly ClockSample[] {
    return this.kept;
  }

  /** The least-delay kept sample, or `null` before the first round trip. */
  get best(): ClockSample | null {
    return bestSample(this.kept);
  }

  /** Server clock minus client clock, from the least-delay sample; 0 before the first round trip. */
  get offsetMs(): number {
    return this.best?.offset ?? 0;
  }

  /** How far {@link offsetMs} can be from the truth: δ/2 of the least-delay sample; Infinity before any. */
  get errorBoundMs(): number {
    const best = this.best;
    return best === null ? Infinity : best.delay / 2;
  }
}

/** Where a countdown is. */
export type TimerStatus = 'idle' | 'running' | 'paused' | 'ended';

/** A countdown as the server keeps and broadcasts it. */
export interface Timer {
  status: TimerStatus;
  /** When a running timer reaches zero, in server epoch ms; `null` unless running. */
  endsAt: number | null;
  /** What was left when the timer was paused, in ms; `null` unless paused. */
  remainingMs: number | null;
  /** The timebox the timer was started with, in ms. */
  durationMs: number;
}

/**
 * The server's clock now, from the client's clock and the estimated offset; refuses either if it is not a finite number.
 * @example serverNow(1_000, 3_600_000) // 3_601_000
 */
export function serverNow(localNowMs: number, offsetMs: number): number {
  return finite('The local time', localNowMs) + finite('The clock offset', offsetMs);
}

/**
 * Milliseconds left on a timer at the server time `serverNowMs`, never below 0: the whole
 * timebox when idle, nothing when ended. A running timer without `endsAt` or a paused one
 * without `remainingMs` (malformed) counts as its whole timebox. Timer fields that are not finite numbers
 * are ignored as missing (a timebox that is not one counts as 0); a server time that is not a finite
 * number is refused.
 * @example remainingMs({ status: 'running', endsAt: 10_000, remainingMs: null, durationMs: 60_000 }, 4_000) // 6_000
 */
export function remainingMs(timer: Timer, serverNowMs: number): number {
  finite('The server time', serverNowMs);
  const durationMs = Number.isFinite(timer.durationMs) ? timer.durationMs : 0;
  const endsAt = timer.endsAt !== null && Number.isFinite(timer.endsAt) ? timer.endsAt : null;
  const left = timer.remainingMs !== null && Number.isFinite(timer.remainingMs) ? timer.remainingMs : null;
  switch (timer.status) {
    case 'idle':
      return Math.max(0, durationMs);
    case 'running':
      return Math.max(0, endsAt === null ? durationMs : endsAt - serverNowMs);
    case 'paused':
      return Math.max(0, left ?? durationMs);
    case 'ended':
      return 0;
  }
}

/**
 * A countdown as `MM:SS`, or `H:MM:SS` above an hour. Partial seconds round up, so the display
 * reads 00:00 exactly when the time is up and shows the full timebox at the start (59.2 s left
 * reads 01:00, 0.3 s reads 00:01). Negative or non-finite values read 00:00.
 * @example formatCountdown(59_200) // '01:00'
 * @example formatCountdown(5_400_000) // '1:30:00'
 */
export function formatCountdown(ms: number): string {
  const total = Number.isFinite(ms) && ms > 0 ? Math.ceil(ms / 1000) : 0;
  const hours = Math.floor(total / 3600);
  const minutes = Math.floor((total % 3600) / 60);
  const seconds = total % 60;
  const two = (value: number): string => String(value).padStart(2, '0');
  return total > 3600 ? `${hours}:${two(minutes)}:${two(seconds)}` : `${two(Math.floor(total / 60))}:${two(seconds)}`;
}
