import { describe, expect, it } from 'vitest';
import {
  bestSample,
  ClockSync,
  formatCountdown,
  ntpSample,
  remainingMs,
  serverNow,
  type ClockSample,
  type Timer,
} from '../../shared/clock';
// A seeded source, so the simulations repeat exactly.
import { mulberry32 as random } from './random';

/**
 * One simulated round trip: the server's clock reads true time, the client's clock reads
 * true time + clientError; the request takes `up` ms, the server holds it `hold` ms, the answer
 * takes `down` ms. Returns the four timestamps as each side reads them.
 */
function roundTrip(trueSend: number, clientError: number, up: number, hold: number, down: number) {
  const t1 = trueSend + clientError;
  const t2 = trueSend + up;
  const t3 = t2 + hold;
  const t4 = t3 + down + clientError;
  return [t1, t2, t3, t4] as const;
}

describe('ntpSample', () => {
  it('gives the offset and delay of a constructed check worked out by hand', () => {
    // RFC 5905 §8: offset = ((T2-T1)+(T3-T4))/2, delay = (T4-T1)-(T3-T2).
    // T1 0.000, T2 0.060, T3 0.061, T4 0.021 s -> θ 0.050 s, δ 0.020 s.
    const seconds = ntpSample(0.0, 0.06, 0.061, 0.021);
    expect(seconds.offset).toBeCloseTo(0.05, 12);
    expect(seconds.delay).toBeCloseTo(0.02, 12);
    // The same in milliseconds, exactly.
    expect(ntpSample(0, 60, 61, 21)).toEqual({ offset: 50, delay: 20 });
  });

  it('is exact when both paths take equal time', () => {
    const [t1, t2, t3, t4] = roundTrip(1_000_000, -3_600_000, 40, 2, 40);
    expect(ntpSample(t1, t2, t3, t4)).toEqual({ offset: 3_600_000, delay: 80 });
  });
});

describe('bestSample', () => {
  it('keeps the sample of least delay (RFC 5905 clock filter)', () => {
    const samples: ClockSample[] = [
      { offset: 120, delay: 300 },
      { offset: 48, delay: 18 },
      { offset: 70, delay: 90 },
    ];
    expect(bestSample(samples)).toBe(samples[1]);
  });

  it('prefers the later of equal delays, and has nothing to pick from no samples', () => {
    const samples: ClockSample[] = [
      { offset: 1, delay: 10 },
      { offset: 2, delay: 10 },
    ];
    expect(bestSample(samples)).toBe(samples[1]);
    expect(bestSample([])).toBeNull();
  });
});

describe('ClockSync', () => {
  it('estimates a client clock an hour off within δ/2 despite asymmetric paths', () => {
    // RFC 5905 §8: with asymmetric paths the offset error is at most δ/2.
    const clientError = -3_600_000; // the phone's clock is an hour behind the server's
    const truth = -clientError;
    const next = random(5905);
    const sync = new ClockSync();
    let trueTime = 1_764_000_000_000;
    for (let i = 0; i < 20; i++) {
      const up = 5 + next() * 400; // a slow, bursty uplink (phone on busy Wi-Fi)
      const down = 5 + next() * 40;
      const hold = next() * 3;
      const sample = sync.addRoundTrip(...roundTrip(trueTime, clientError, up, hold, down));
      if (!sample) throw new Error('a round trip of finite times gives a sample');
      expect(Math.abs(sample.offset - truth)).toBeLessThanOrEqual(sample.delay / 2 + 1e-6);
      expect(Math.abs(sync.offsetMs - truth)).toBeLessThanOrEqual(sync.errorBoundMs + 1e-6);
      trueTime += 2_000;
    }
    expect(sync.samples).toHaveLength(ClockSync.WINDOW);
    expect(sync.errorBoundMs).toBe(Math.min(...sync.samples.map((s) => s.delay)) / 2);
    expect(sync.errorBoundMs).toBeLessThan(100);
  });

  it('keeps only the last 8 samples, so an old lucky sample ages out', () => {
    const sync = new ClockSync();
    sync.add({ offset: 10, delay: 1 });
    for (let i = 0; i < 8; i++) sync.add({ offset: 20 + i, delay: 50 + i });
    expect(sync.samples).toHaveLength(8);
    expect(sync.offsetMs).toBe(20);
    expect(sync.errorBoundMs).toBe(25);
  });

  it('reports nothing known before the first round trip and ignores garbled samples', () => {
    const sync = new ClockSync();
    expect(sync.offsetMs).toBe(0);
    expect(sync.errorBoundMs).toBe(Infinity);
    expect(sync.best).toBeNull();
    expect(sync.add({ offset: 5, delay: -3 })).toBe(false);
    expect(sync.add({ offset: Number.NaN, delay: 3 })).toBe(false);
    expect(sync.samples).toHaveLength(0);
  });

  it('lets phones with different clock errors show the same remaining second', () => {
    const timer: Timer = { status: 'running', endsAt: 1_000_000 + 300_000, remainingMs: null, durationMs: 300_000 };
    const next = random(42);
    const phones = [-3_600_000, 7 * 60_000, 1_234].map((clientError) => {
      const sync = new ClockSync();
      for (let i = 0; i < 8; i++) {
        sync.addRoundTrip(...roundTrip(900_000 + i * 1_000, clientError, 5 + next() * 200, 1, 5 + next() * 20));
      }
      expect(sync.errorBoundMs).toBeLessThan(500);
      return { clientError, sync };
    });
    // At true instants half a second from a second boundary, every phone's error (< 0.5 s) is
    // too small to change the displayed second.
    for (let trueNow = 1_000_500; trueNow < 1_300_000; trueNow += 7_000) {
      const shown = phones.map(({ clientError, sync }) =>
        formatCountdown(remainingMs(timer, serverNow(trueNow + clientError, sync.offsetMs))),
      );
      expect(new Set(shown).size).toBe(1);
      expect(shown[0]).toBe(formatCountdown(timer.endsAt! - trueNow));
    }
  });
});

describe('remainingMs', () => {
  const base = { endsAt: null, remainingMs: null, durationMs: 600_000 };

  it('counts down a running timer against the server clock, never below 0', () => {
    const running: Timer = { ...base, status: 'running', endsAt: 2_000_000 };
    expect(remainingMs(running, 1_400_000)).toBe(600_000);
    expect(remainingMs(running, 1_999_001)).toBe(999);
    expect(remainingMs(running, 2_000_000)).toBe(0);
    expect(remainingMs(running, 2_500_000)).toBe(0);
  });

  it('holds still while paused, whatever the clock says', () => {
    const paused: Timer = { ...base, status: 'paused', remainingMs: 123_456 };
    expect(remainingMs(paused, 0)).toBe(123_456);
    expect(remainingMs(paused, 9_999_999_999)).toBe(123_456);
  });

  it('shows the whole timebox when idle and nothing when ended', () => {
    expect(remainingMs({ ...base, status: 'idle' }, 5)).toBe(600_000);
    expect(remainingMs({ ...base, status: 'ended' }, 5)).toBe(0);
  });

  it('adds up with serverNow: the client clock plus the offset', () => {
    const running: Timer = { ...base, status: 'running', endsAt: 3_600_000 + 60_000 };
    expect(serverNow(30_000, 3_600_000)).toBe(3_630_000);
    expect(remainingMs(running, serverNow(30_000, 3_600_000))).toBe(30_000);
  });
});

describe('formatCountdown', () => {
  // Cairn's own display rule (no outside source): whole seconds rounded up.
  it('rounds partial seconds up so the display reaches 00:00 exactly at the end', () => {
    expect(formatCountdown(600_000)).toBe('10:00');
    expect(formatCountdown(59_200)).toBe('01:00');
    expect(formatCountdown(59_000)).toBe('00:59');
    expect(formatCountdown(1)).toBe('00:01');
    expect(formatCountdown(0)).toBe('00:00');
    expect(formatCountdown(-5_000)).toBe('00:00');
    expect(formatCountdown(Number.NaN)).toBe('00:00');
  });

  it('switches to H:MM:SS above an hour', () => {
    expect(formatCountdown(3_600_000)).toBe('60:00');
    expect(formatCountdown(3_600_001)).toBe('1:00:01');
    expect(formatCountdown(5_400_000)).toBe('1:30:00');
    expect(formatCountdown(8 * 3_600_000)).toBe('8:00:00');
  });
});
