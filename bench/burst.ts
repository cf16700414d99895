/**
 * The vote burst of the benchmark: the facilitator opens a dot vote on four options, then every
 * phone (in the client workers) spends its dots, each at a random moment within the window, as a
 * room does after "go"; each dot carries its own client id, so the stored votes can be checked by id.
 */
import type { Socket } from 'socket.io-client';
import type { LiveState } from '../shared/schemas/live';

interface BurstInput {
  child: { ask<T>(type: string, payload?: unknown): Promise<T> };
  facilitator: Socket;
  workers: { ask<T>(type: string, payload?: unknown): Promise<T>; offsetMs: number }[];
  dotsEach: number;
  windowMs: number;
  ask: <T>(s: Socket, event: string, payload?: unknown) => Promise<T>;
  /** Index of the dot-vote item in the agenda. */
  voteIndex: number;
  /** The benchmark's clock (ms since the epoch). */
  now: () => number;
}

interface Tallied {
  kind: string;
  overall?: { optionId: string; dots: number }[];
}

interface WorkerBurst {
  acks: number[];
  acked: string[];
  sent: string[];
  refused: number;
  timedOut: number;
  busyErrors: number;
  lastAckAt: number;
}

/** Runs the burst and returns acknowledgement latencies, the client ids sent and acknowledged, and how soon the console's tally caught up. */
export async function runBurst({ child, facilitator, workers, dotsEach, windowMs, ask, voteIndex, now }: BurstInput) {
  await ask<LiveState>(facilitator, 'session:goto', { index: voteIndex });
  const vote = await ask<{ options: { id: string }[] }>(facilitator, 'vote:setup', {
    options: [{ text: 'Unlock with one tap' }, { text: 'Saddle height guide at the dock' }, { text: 'Free dock finder' }, { text: 'A ride buddy for the first trip' }],
    rules: { dotsPerVoter: dotsEach, capPerOption: dotsEach, allowStacking: true, criteria: [] },
  });
  await ask(facilitator, 'vote:open');
  const optionIds = vote.options.map((o) => o.id);
  // The server's CPU and event loop are counted from here: the votes, not the vote's set-up pushed to every phone.
  await child.ask('reset');
  let consoleTotal = 0;
  const totals: { at: number; total: number }[] = [];
  facilitator.on('vote:tallied', (r: Tallied) => {
    if (r.kind !== 'dot_vote' || !r.overall) return;
    consoleTotal = r.overall.reduce((sum, row) => sum + row.dots, 0);
    totals.push({ at: now(), total: consoleTotal });
  });
  // Every worker starts its window at the same moment (its own clock, corrected by its offset).
  const startAt = now() + 300;
  const prefix = `b${Date.now().toString(36)}`;
  const results = await Promise.all(
    workers.map((w) => w.ask<WorkerBurst>('burst', { optionIds, dotsEach, windowMs, startAt: startAt + w.offsetMs, prefix })),
  );
  const acked = results.reduce((n, r) => n + r.acked.length, 0);
  const lastAckAt = Math.max(...results.map((r, k) => r.lastAckAt - workers[k]!.offsetMs));
  // The console's tally must reach what is stored; give it up to 10 s and report how long it took.
  const stored = await child.ask<number>('dots');
  const deadline = now() + 10_000;
  while (consoleTotal !== stored && now() < deadline) await new Promise((r) => setTimeout(r, 20));
  const caughtUp = totals.find((t) => t.total === stored && t.at >= lastAckAt - 1)?.at ?? (consoleTotal === stored ? now() : Infinity);
  return {
    kind: 'dot vote',
    sent: results.reduce((n, r) => n + r.sent.length, 0),
    acked,
    refused: results.reduce((n, r) => n + r.refused, 0),
    timedOut: results.reduce((n, r) => n + r.timedOut, 0),
    busyErrors: results.reduce((n, r) => n + r.busyErrors, 0),
    acks: results.flatMap((r) => r.acks),
    sentIds: results.flatMap((r) => r.sent),
    ackedIds: results.flatMap((r) => r.acked),
    storedWhileRunning: stored,
    tallyLagMs: caughtUp === Infinity ? Infinity : Math.max(0, caughtUp - lastAckAt),
  };
}

/** The same burst against the bare server, which acknowledges every dot at once: the baseline's CPU and heap after a burst. */
export async function runBareBurst({ workers, dotsEach, windowMs, now }: Pick<BurstInput, 'workers' | 'dotsEach' | 'windowMs' | 'now'>) {
  const startAt = now() + 300;
  const results = await Promise.all(
    workers.map((w) => w.ask<WorkerBurst>('burst', { optionIds: ['a', 'b', 'c', 'd'], dotsEach, windowMs, startAt: startAt + w.offsetMs, prefix: 'bare' })),
  );
  return { acked: results.reduce((n, r) => n + r.acked.length, 0), acks: results.flatMap((r) => r.acks) };
}
