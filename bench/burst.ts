/**
 * The vote burst of the benchmark: the facilitator opens a dot vote on four options, then every
 * phone spends its dots, each at a random moment within the window, as a room does after "go".
 */
import crypto from 'node:crypto';
import { performance } from 'node:perf_hooks';
import type { Socket } from 'socket.io-client';
import type { LiveState } from '../shared/schemas/live';
import { OVERALL_CRITERION } from '../shared/tally';

interface BurstInput {
  child: { ask<T>(type: string, payload?: unknown): Promise<T> };
  facilitator: Socket;
  phones: Socket[];
  dotsEach: number;
  windowMs: number;
  ask: <T>(s: Socket, event: string, payload?: unknown) => Promise<T>;
  /** Index of the dot-vote item in the agenda. */
  voteIndex: number;
}

interface Tallied {
  kind: string;
  overall?: { optionId: string; dots: number }[];
}

/** Runs the burst and returns acknowledgement latencies, what was stored and how soon the console's tally caught up. */
export async function runBurst({ child, facilitator, phones, dotsEach, windowMs, ask, voteIndex }: BurstInput) {
  await ask<LiveState>(facilitator, 'session:goto', { index: voteIndex });
  const vote = await ask<{ options: { id: string }[] }>(facilitator, 'vote:setup', {
    options: [{ text: 'Unlock with one tap' }, { text: 'Saddle height guide at the dock' }, { text: 'Free dock finder' }, { text: 'A ride buddy for the first trip' }],
    rules: { dotsPerVoter: dotsEach, capPerOption: dotsEach, allowStacking: true, criteria: [] },
  });
  await ask(facilitator, 'vote:open');
  const optionIds = vote.options.map((o) => o.id);
  const sent = phones.length * dotsEach;
  const acks: number[] = [];
  let acked = 0;
  let busyErrors = 0;
  let refused = 0;
  let lastAckAt = 0;
  let consoleTotal = 0;
  let consoleCaughtUpAt = 0;
  facilitator.on('vote:tallied', (r: Tallied) => {
    if (r.kind !== 'dot_vote' || !r.overall) return;
    consoleTotal = r.overall.reduce((sum, row) => sum + row.dots, 0);
    if (consoleTotal === acked && acked > 0) consoleCaughtUpAt = performance.now();
  });
  await Promise.all(
    phones.flatMap((s, i) =>
      Array.from({ length: dotsEach }, (_, k) =>
        new Promise<void>((resolve) => {
          setTimeout(async () => {
            const t0 = performance.now();
            try {
              await ask(s, 'vote:dot', {
                clientId: `bench-${i}-${k}-${crypto.randomUUID()}`.slice(0, 64),
                optionId: optionIds[(i + k) % optionIds.length],
                criterionId: OVERALL_CRITERION,
                delta: 1,
              });
              acks.push(performance.now() - t0);
              acked += 1;
              lastAckAt = performance.now();
            } catch (err) {
              if (String(err).includes('BUSY')) busyErrors += 1;
              else refused += 1;
            }
            resolve();
          }, Math.random() * windowMs);
        }),
      ),
    ),
  );
  // The console's tally must reach what is stored; give it up to 10 s and report how long it took.
  const stored = await child.ask<number>('dots');
  const deadline = performance.now() + 10_000;
  while (consoleTotal !== stored && performance.now() < deadline) await new Promise((r) => setTimeout(r, 20));
  const caughtUp = consoleTotal === stored ? Math.max(consoleCaughtUpAt, lastAckAt) : Infinity;
  return {
    kind: 'dot vote',
    sent,
    acked,
    refused,
    acks,
    stored,
    lost: Math.max(0, acked - stored),
    duplicates: Math.max(0, stored - sent),
    busyErrors,
    tallyLagMs: caughtUp === Infinity ? Infinity : Math.max(0, caughtUp - lastAckAt),
  };
}
