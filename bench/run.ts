/**
 * `npm run bench`: how Cairn holds a full room, against a bare socket.io server as the baseline.
 * Connects N simulated phones (default 1,000; `--phones N`), then measures join time, the fan-out
 * of an activity change, a burst of votes, heap per phone, event-loop delay and CPU, prints a
 * table and writes one JSON object (`--json FILE`, default bench/results/latest.json).
 */
import { fork, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import os from 'node:os';
import crypto from 'node:crypto';
import { performance } from 'node:perf_hooks';
import { io as ioClient, type Socket } from 'socket.io-client';
import { DEMO_ACCOUNTS, DEMO_WORKSHOP_TITLE } from '../server/db/seed';
import type { ScreenState } from '../shared/schemas/live';

// ---------- arguments ----------
const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1]! : fallback;
};
const PHONES = Number(arg('phones', '1000'));
const JSON_FILE = arg('json', path.join('bench', 'results', 'latest.json'));
const FANOUT_ROUNDS = Number(arg('rounds', '30'));
/** Rounds sent first and not counted, on both servers: the first changes run code that is not compiled yet. */
const WARMUP_ROUNDS = 2;
const DOTS_EACH = 5;
const BURST_MS = 5000;
const CONCURRENCY = 50;

// ---------- helpers ----------
/** Percentile p (0–100) of a list of numbers, nearest-rank. */
function pct(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))]!;
}
const round = (n: number, d = 1) => Math.round(n * 10 ** d) / 10 ** d;

interface Child {
  proc: ChildProcess;
  port: number;
  ask<T>(type: string, payload?: unknown): Promise<T>;
}

async function startChild(mode: 'cairn' | 'bare'): Promise<Child> {
  const proc = fork(path.join('bench', 'server-child.ts'), [mode], {
    execArgv: ['--expose-gc', '--import', 'tsx', '--max-old-space-size=4096'],
    stdio: ['ignore', 'inherit', 'inherit', 'ipc'],
    // Every simulated phone joins with the same code: the per-code join limit must let them all in.
    env: { ...process.env, BENCH_JOINS_PER_CODE: String(Math.max(2_000, PHONES * 2)) },
  });
  let next = 1;
  const waiting = new Map<number, (d: unknown) => void>();
  const port = await new Promise<number>((resolve, reject) => {
    proc.once('exit', (code) => reject(new Error(`${mode} server exited (${code})`)));
    proc.on('message', (m: { ready?: boolean; port?: number; id?: number; data?: unknown }) => {
      if (m.ready) resolve(m.port!);
      else if (m.id !== undefined) {
        waiting.get(m.id)?.(m.data);
        waiting.delete(m.id);
      }
    });
  });
  return {
    proc,
    port,
    ask: <T>(type: string, payload?: unknown) =>
      new Promise<T>((resolve) => {
        const id = next++;
        waiting.set(id, resolve as (d: unknown) => void);
        proc.send({ id, type, payload });
      }),
  };
}

function connect(port: number, token?: string): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = ioClient(`http://127.0.0.1:${port}`, {
      auth: token ? { token } : {},
      transports: ['websocket'],
      reconnection: false,
      forceNew: true,
      timeout: 30_000,
    });
    s.once('connect', () => resolve(s));
    s.once('connect_error', reject);
  });
}

async function ask<T>(s: Socket, event: string, payload: unknown = {}): Promise<T> {
  const answer = (await s.timeout(30_000).emitWithAck(event, payload)) as { data?: T; error?: { code: string; message: string } };
  if (answer.error) throw new Error(`${event}: ${answer.error.code} ${answer.error.message}`);
  return answer.data as T;
}

async function http<T>(port: number, method: string, url: string, body?: unknown, token?: string): Promise<T> {
  const res = await fetch(`http://127.0.0.1:${port}/api${url}`, {
    method,
    headers: { 'Content-Type': 'application/json', ...(token ? { Authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

/** Runs `work` over the items with at most `limit` at a time. */
async function pool<T, R>(items: T[], limit: number, work: (item: T, i: number) => Promise<R>): Promise<R[]> {
  const out: R[] = new Array(items.length);
  let at = 0;
  await Promise.all(
    Array.from({ length: Math.min(limit, items.length) }, async () => {
      while (at < items.length) {
        const i = at++;
        out[i] = await work(items[i]!, i);
      }
    }),
  );
  return out;
}

/** Sends one change and times its arrival at every phone. */
async function fanOut(phones: Socket[], send: () => Promise<unknown>, expect: (state: ScreenState) => boolean): Promise<number[]> {
  const t0 = performance.now();
  const arrivals = phones.map(
    (s) =>
      new Promise<number>((resolve) => {
        const listener = (state: ScreenState) => {
          if (!expect(state)) return;
          s.off('session:updated', listener);
          resolve(performance.now() - t0);
        };
        s.on('session:updated', listener);
      }),
  );
  await send();
  return Promise.all(arrivals);
}

// ---------- the Cairn run ----------
interface Stats {
  heapUsed: number;
  loopDelayP99Ms: number;
  cpuUserMs: number;
  cpuSystemMs: number;
}

async function benchCairn() {
  const child = await startChild('cairn');
  const { port } = child;
  const signIn = await http<{ accessToken: string }>(port, 'POST', '/auth/sign-in', {
    email: DEMO_ACCOUNTS.facilitator.email,
    password: DEMO_ACCOUNTS.facilitator.password,
  });
  const token = signIn.accessToken;
  const demo = (await http<{ id: string; title: string }[]>(port, 'GET', '/workshops', undefined, token)).find((w) => w.title === DEMO_WORKSHOP_TITLE)!;
  const agenda = (await http<{ agenda: { type: string }[] }>(port, 'GET', `/workshops/${demo.id}`, undefined, token)).agenda;
  const voteIndex = agenda.findIndex((i) => i.type === 'dot_vote');
  const info = await http<{ sessionId: string; joinCode: string }>(port, 'POST', `/workshops/${demo.id}/live`, {}, token);
  const facilitator = await connect(port, token);
  await ask(facilitator, 'session:watch', { sessionId: info.sessionId });

  const heapBefore = await child.ask<number>('gc');
  const joinTimes: number[] = [];
  const phones = await pool(Array.from({ length: PHONES }, (_, i) => i), CONCURRENCY, async (i) => {
    const t0 = performance.now();
    const joined = await http<{ token: string }>(port, 'POST', `/join/${info.joinCode}`, {
      displayName: `Rider ${i + 1}`,
      photoConsent: i % 3 !== 0,
      deviceId: `bench-${i}-${crypto.randomUUID()}`,
    });
    const s = await connect(port, joined.token);
    await ask<ScreenState>(s, 'session:sync');
    joinTimes.push(performance.now() - t0);
    return s;
  });
  await new Promise((r) => setTimeout(r, 1000));
  const heapAfter = await child.ask<number>('gc');

  // Fan-out of an activity change: the facilitator moves between items; every phone times the arrival.
  const fanout: number[] = [];
  // The baseline sends what a phone received: the phone's state, not the console's answer.
  let payload = null as ScreenState | null;
  phones[0]!.on('session:updated', (s: ScreenState) => (payload = s));
  for (let r = 0; r < WARMUP_ROUNDS + FANOUT_ROUNDS; r++) {
    const index = r % 2 === 0 ? 2 : 3;
    const times = await fanOut(
      phones,
      () => ask(facilitator, 'session:goto', { index }),
      (s) => s.currentIndex === index,
    );
    if (r >= WARMUP_ROUNDS) fanout.push(...times);
    await new Promise((r2) => setTimeout(r2, 200));
  }

  // The burst: every phone spends its dots within the window, each at a random moment.
  await child.ask('reset');
  const burst = await voteBurst(child, facilitator, phones, voteIndex);
  const burstStats = await child.ask<Stats>('stats');

  for (const s of [...phones, facilitator]) s.disconnect();
  await child.ask('close');
  return {
    joinTimes,
    heapPerPhone: (heapAfter - heapBefore) / PHONES,
    fanout,
    payload: payload!,
    burst,
    burstStats,
  };
}

/** The vote burst: each phone sends DOTS_EACH votes at random times within BURST_MS. */
async function voteBurst(child: Child, facilitator: Socket, phones: Socket[], voteIndex: number) {
  const plan = await import('./burst');
  return plan.runBurst({ child, facilitator, phones, dotsEach: DOTS_EACH, windowMs: BURST_MS, ask, voteIndex });
}

// ---------- the baseline ----------
async function benchBare(payload: ScreenState) {
  const child = await startChild('bare');
  const heapBefore = await child.ask<number>('gc');
  const joinTimes: number[] = [];
  const phones = await pool(Array.from({ length: PHONES }, (_, i) => i), CONCURRENCY, async () => {
    const t0 = performance.now();
    const s = await connect(child.port);
    await ask(s, 'ping:ack');
    joinTimes.push(performance.now() - t0);
    return s;
  });
  await new Promise((r) => setTimeout(r, 1000));
  const heapAfter = await child.ask<number>('gc');
  const fanout: number[] = [];
  for (let r = 0; r < WARMUP_ROUNDS + FANOUT_ROUNDS; r++) {
    const version = 1_000_000 + r;
    const times = await fanOut(phones, () => child.ask('broadcast', { ...payload, version }), (s) => s.version === version);
    if (r >= WARMUP_ROUNDS) fanout.push(...times);
    await new Promise((r2) => setTimeout(r2, 200));
  }
  for (const s of phones) s.disconnect();
  await child.ask('close');
  return { joinTimes, heapPerPhone: (heapAfter - heapBefore) / PHONES, fanout };
}

// ---------- report ----------
async function main(): Promise<void> {
  console.log(`Cairn benchmark: ${PHONES} phones on ${os.cpus().length} cores (${os.cpus()[0]?.model ?? 'unknown CPU'}), Node ${process.version}`);
  const cairn = await benchCairn();
  const bare = await benchBare(cairn.payload);
  const result = {
    phones: PHONES,
    machine: { cores: os.cpus().length, cpu: os.cpus()[0]?.model ?? '', memoryGiB: round(os.totalmem() / 2 ** 30), node: process.version },
    join_p95_ms: round(pct(cairn.joinTimes, 95)),
    baseline_join_p95_ms: round(pct(bare.joinTimes, 95)),
    fanout_p50_ms: round(pct(cairn.fanout, 50)),
    fanout_p95_ms: round(pct(cairn.fanout, 95)),
    fanout_p99_ms: round(pct(cairn.fanout, 99)),
    baseline_fanout_p50_ms: round(pct(bare.fanout, 50)),
    baseline_fanout_p95_ms: round(pct(bare.fanout, 95)),
    baseline_fanout_p99_ms: round(pct(bare.fanout, 99)),
    fanout_ratio_p95: round(pct(cairn.fanout, 95) / pct(bare.fanout, 95), 2),
    fanout_payload_bytes: Buffer.byteLength(JSON.stringify(cairn.payload)),
    burst_kind: cairn.burst.kind,
    ack_p50_ms: round(pct(cairn.burst.acks, 50)),
    ack_p99_ms: round(pct(cairn.burst.acks, 99)),
    votes_sent: cairn.burst.sent,
    votes_acked: cairn.burst.acked,
    votes_stored: cairn.burst.stored,
    lost: cairn.burst.lost,
    duplicates: cairn.burst.duplicates,
    busy_errors: cairn.burst.busyErrors,
    votes_refused: cairn.burst.refused,
    tally_lag_ms: round(cairn.burst.tallyLagMs),
    heap_per_phone_bytes: Math.round(cairn.heapPerPhone),
    baseline_heap_per_phone_bytes: Math.round(bare.heapPerPhone),
    heap_ratio: round(cairn.heapPerPhone / bare.heapPerPhone, 2),
    loop_delay_p99_ms: round(cairn.burstStats.loopDelayP99Ms),
    cpu_burst_ms: round(cairn.burstStats.cpuUserMs + cairn.burstStats.cpuSystemMs),
    targets: {} as Record<string, boolean>,
  };
  result.targets = {
    'fan-out p95 ≤ 1.5 × baseline': result.fanout_ratio_p95 <= 1.5,
    'vote ack p99 < 250 ms': result.ack_p99_ms < 250,
    'tally equals stored within 1 s': result.tally_lag_ms <= 1000,
    'heap per phone < 2 × baseline': result.heap_ratio < 2,
    'nothing lost or duplicated': result.lost === 0 && result.duplicates === 0,
  };
  const rows: [string, string, string][] = [
    ['phones', String(PHONES), ''],
    ['join p95 (HTTP join + socket + sync)', `${result.join_p95_ms} ms`, `${result.baseline_join_p95_ms} ms (connect only)`],
    ['fan-out p50 / p95 / p99', `${result.fanout_p50_ms} / ${result.fanout_p95_ms} / ${result.fanout_p99_ms} ms`, `${result.baseline_fanout_p50_ms} / ${result.baseline_fanout_p95_ms} / ${result.baseline_fanout_p99_ms} ms`],
    ['fan-out ratio p95', String(result.fanout_ratio_p95), '≤ 1.5'],
    [`${result.burst_kind} burst: ack p50 / p99`, `${result.ack_p50_ms} / ${result.ack_p99_ms} ms`, 'p99 < 250 ms'],
    ['sent / acked / stored', `${result.votes_sent} / ${result.votes_acked} / ${result.votes_stored}`, ''],
    ['lost / duplicates / SQLITE_BUSY / refused', `${result.lost} / ${result.duplicates} / ${result.busy_errors} / ${result.votes_refused}`, '0 / 0 / 0 / 0'],
    ['console tally lag', `${result.tally_lag_ms} ms`, '≤ 1000 ms'],
    ['heap per phone', `${result.heap_per_phone_bytes} B`, `${result.baseline_heap_per_phone_bytes} B (ratio ${result.heap_ratio}, < 2)`],
    ['event-loop delay p99 (burst)', `${result.loop_delay_p99_ms} ms`, ''],
    ['server CPU during burst', `${result.cpu_burst_ms} ms`, ''],
  ];
  const w0 = Math.max(...rows.map((r) => r[0].length));
  const w1 = Math.max(...rows.map((r) => r[1].length));
  console.log(`\n${'measure'.padEnd(w0)}  ${'Cairn'.padEnd(w1)}  baseline / target`);
  for (const [a, b, c] of rows) console.log(`${a.padEnd(w0)}  ${b.padEnd(w1)}  ${c}`);
  console.log('\ntargets:');
  for (const [k, ok] of Object.entries(result.targets)) console.log(`  ${ok ? 'met    ' : 'MISSED '} ${k}`);
  fs.mkdirSync(path.dirname(JSON_FILE), { recursive: true });
  fs.writeFileSync(JSON_FILE, JSON.stringify(result, null, 2));
  console.log(`\nwritten: ${JSON_FILE}`);
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
