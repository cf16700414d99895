/**
 * The burst of the benchmark: every phone acts DOTS_EACH times at random moments within the window.
 * Until the dot vote's commands land, the burst sends notes (`submission:create`) the same way;
 * both go through the same writer queue and acknowledgement path.
 */
import crypto from 'node:crypto';
import { performance } from 'node:perf_hooks';
import type { Socket } from 'socket.io-client';
import type { LiveState } from '../shared/schemas/live';

interface BurstInput {
  child: { ask<T>(type: string, payload?: unknown): Promise<T> };
  facilitator: Socket;
  phones: Socket[];
  dotsEach: number;
  windowMs: number;
  ask: <T>(s: Socket, event: string, payload?: unknown) => Promise<T>;
}

/** Runs the burst and returns acknowledgement latencies and what was stored. */
export async function runBurst({ child, facilitator, phones, dotsEach, windowMs, ask }: BurstInput) {
  const state = await ask<LiveState>(facilitator, 'session:goto', { index: 6 });
  const itemId = state.item!.id;
  const sent = phones.length * dotsEach;
  const acks: number[] = [];
  let acked = 0;
  let busyErrors = 0;
  let seen = 0;
  let lastAckAt = 0;
  let tallyDoneAt = 0;
  const storedBefore = await child.ask<number>('count', { table: 'submissions' });
  facilitator.on('submission:created', () => {
    seen += 1;
    if (seen === sent) tallyDoneAt = performance.now();
  });
  await Promise.all(
    phones.flatMap((s, i) =>
      Array.from({ length: dotsEach }, (_, k) =>
        new Promise<void>((resolve) => {
          setTimeout(async () => {
            const t0 = performance.now();
            try {
              await ask(s, 'submission:create', { clientId: `bench-${i}-${k}-${crypto.randomUUID()}`, itemId, kind: 'note', text: `Dock ${k + 1} was full` });
              acks.push(performance.now() - t0);
              acked += 1;
              lastAckAt = performance.now();
            } catch (err) {
              if (String(err).includes('BUSY')) busyErrors += 1;
            }
            resolve();
          }, Math.random() * windowMs);
        }),
      ),
    ),
  );
  const deadline = performance.now() + 10_000;
  while (!tallyDoneAt && performance.now() < deadline) await new Promise((r) => setTimeout(r, 20));
  const stored = (await child.ask<number>('count', { table: 'submissions' })) - storedBefore;
  return {
    kind: 'note',
    sent,
    acked,
    acks,
    stored,
    lost: Math.max(0, acked - stored),
    duplicates: Math.max(0, stored - sent),
    busyErrors,
    tallyLagMs: tallyDoneAt ? Math.max(0, tallyDoneAt - lastAckAt) : Infinity,
  };
}
