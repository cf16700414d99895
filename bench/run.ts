/**
 * `npm run bench`: how Cairn holds a full room, against a bare socket.io server as the baseline.
 * Connects N simulated phones (default 1,000; `--phones N`) from several worker processes (default 4;
 * `--client-workers N`, bench/client-worker.ts), then measures join time, the fan-out of an activity
 * change, a burst of votes checked by client id against the SQLite file once the server has stopped,
 * heap per phone after the joins and after the burst, event-loop delay and server CPU per acknowledged
 * vote, prints a table and writes one JSON object (`--json FILE`, default bench/results/latest.json).
 * All of it runs once first over both servers without being counted (`--warmup-passes N`, default 1), then
 * three times counted (`--passes N`): every figure is taken over the passes together, and each pass's own
 * figures are printed and kept in the JSON beside them.
 */
import { fork, type ChildProcess } from 'node:child_process';
import fs from 'node:fs';
import path from 'node:path';
import os from 'node:os';
import { performance } from 'node:perf_hooks';
import sqlite3 from 'sqlite3';
import { io as ioClient, type Socket } from 'socket.io-client';
import { DEMO_ACCOUNTS, DEMO_WORKSHOP_TITLE } from '../server/db/seed';
import { runBareBurst, runBurst } from './burst';

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
/** Joins in flight at once over all workers (a room scanning the code within a minute). */
const CONCURRENCY = 50;
/**
 * Passes over both servers run first and not counted (`--warmup-passes N`): the phones' processes start
 * cold, and whichever server they met first paid for their compiling. Measured 2026-12-03 at 1,000 phones
 * with the same four workers meeting Cairn, the bare server, Cairn and the bare server again, each server
 * a fresh process: fan-out p95 53.4, 30.2, 42.8, 37.5 ms and 78.9, 37.8, 31.9, 32.0 ms. In the first pass
 * Cairn's first ten rounds had a median p95 of 59 and 79 ms and its last twenty 34 and 41 ms; the bare
 * server's, met second, 36 and 39 ms, then 23 and 30 ms (docs/benchmark.md).
 */
const WARMUP_PASSES = Math.max(0, Number(arg('warmup-passes', '1')));
/**
 * Passes over both servers that are counted (`--passes N`, default 3), each with fresh server processes. The
 * figures are taken over all of them together: the latencies' percentiles over every sample, the CPU per vote
 * as the bursts' CPU over their votes, the heap per phone as the passes' mean; lost, duplicated and unknown
 * votes are added up, and the tally's lag is the slowest pass's. On a shared machine one pass's ratio moved by
 * tens of percent between runs of one build (docs/benchmark.md), so one pass alone could not tell a steady
 * margin from luck; each pass's own figures are printed and kept in the JSON (`passes`).
 */
const PASSES = Math.max(1, Number(arg('passes', '3')));
/** Processes the simulated phones run in, so the phones' own work is not one event loop the server's pushes wait on. */
const CLIENT_WORKERS = Math.max(1, Math.min(PHONES, Number(arg('client-workers', '4'))));

// ---------- helpers ----------
/** Milliseconds since the epoch, sub-millisecond, comparable with the workers' clocks once calibrated. */
const now = () => performance.timeOrigin + performance.now();

/** Percentile p (0–100) of a list of numbers, nearest-rank. */
function pct(values: number[], p: number): number {
  if (values.length === 0) return NaN;
  const sorted = [...values].sort((a, b) => a - b);
  return sorted[Math.min(sorted.length - 1, Math.max(0, Math.ceil((p / 100) * sorted.length) - 1))]!;
}
const round = (n: number, d = 1) => Math.round(n * 10 ** d) / 10 ** d;

/** A forked process answering `{ id, type, payload }` requests over IPC. */
export interface Child {
  proc: ChildProcess;
  ready: { port?: number };
  ask<T>(type: string, payload?: unknown): Promise<T>;
}

async function forkChild(script: string, argv: string[], env: NodeJS.ProcessEnv, execArgv: string[]): Promise<Child> {
  const proc = fork(path.join('bench', script), argv, { execArgv: [...execArgv, '--import', 'tsx'], stdio: ['ignore', 'inherit', 'inherit', 'ipc'], env });
  let next = 1;
  const waiting = new Map<number, (d: unknown) => void>();
  const ready = await new Promise<{ port?: number }>((resolve, reject) => {
    proc.once('exit', (code) => reject(new Error(`${script} ${argv.join(' ')} exited (${code})`)));
    proc.on('message', (m: { ready?: boolean; port?: number; id?: number; data?: unknown }) => {
      if (m.ready) resolve(m);
      else if (m.id !== undefined) {
        waiting.get(m.id)?.(m.data);
        waiting.delete(m.id);
      }
    });
  });
  return {
    proc,
    ready,
    ask: <T>(type: string, payload?: unknown) =>
      new Promise<T>((resolve, reject) => {
        const id = next++;
        waiting.set(id, (d) => {
          const failed = d as { error?: string } | null;
          if (failed && typeof failed === 'object' && 'error' in failed && typeof failed.error === 'string') reject(new Error(failed.error));
          else resolve(d as T);
        });
        proc.send({ id, type, payload });
      }),
  };
}

function startServer(mode: 'cairn' | 'bare'): Promise<Child> {
  // Every simulated phone joins with the same code: the per-code join quota is the number of phones started.
  return forkChild('server-child.ts', [mode], { ...process.env, BENCH_JOINS_PER_CODE: String(Math.max(10, PHONES)) }, ['--expose-gc', '--max-old-space-size=4096', ...(process.env.BENCH_SERVER_FLAGS ?? '').split(' ').filter(Boolean)]);
}

/** A worker of simulated phones and the offset of its clock from this process's (its time minus ours). */
interface Worker extends Child {
  offsetMs: number;
}

async function startWorkers(): Promise<Worker[]> {
  return Promise.all(
    Array.from({ length: CLIENT_WORKERS }, async () => {
      const child = await forkChild('client-worker.ts', [], process.env, ['--max-old-space-size=2048']);
      // The offset at the quickest of a few round trips (NTP's estimate: the reply was read at the middle).
      let best = { rtt: Infinity, offset: 0 };
      for (let i = 0; i < 7; i++) {
        const t0 = now();
        const theirs = await child.ask<number>('clock');
        const t1 = now();
        if (t1 - t0 < best.rtt) best = { rtt: t1 - t0, offset: theirs - (t0 + t1) / 2 };
      }
      return { ...child, offsetMs: best.offset };
    }),
  );
}

/** Joins the phones over the workers, round-robin, each worker a share of the joins in flight; returns every join's time. */
async function joinAll(workers: Worker[], port: number, joinCode: string | null): Promise<number[]> {
  const shares = workers.map((_, w) => Array.from({ length: PHONES }, (_, i) => i).filter((i) => i % workers.length === w));
  const times = await Promise.all(
    workers.map((w, k) => w.ask<number[]>('join', { port, joinCode, indices: shares[k], concurrency: Math.max(1, Math.round(CONCURRENCY / workers.length)) })),
  );
  return times.flat();
}

/** Arms every worker for a change, sends it, and returns its arrival at every phone, from the moment it was sent. */
async function fanOut(workers: Worker[], expect: { index?: number; version?: number }, send: () => Promise<unknown>): Promise<{ times: number[]; payload: unknown }> {
  await Promise.all(workers.map((w) => w.ask('arm', expect)));
  const t0 = now();
  await send();
  const arrivals = await Promise.all(workers.map((w) => w.ask<{ at: number[]; payload: unknown }>('arrivals')));
  return { times: arrivals.flatMap((a, k) => a.at.map((at) => at - workers[k]!.offsetMs - t0)), payload: arrivals[0]!.payload };
}

function connect(port: number, token?: string): Promise<Socket> {
  return new Promise((resolve, reject) => {
    const s = ioClient(`http://127.0.0.1:${port}`, { auth: token ? { token } : {}, transports: ['websocket'], reconnection: false, forceNew: true, timeout: 30_000 });
    s.once('connect', () => resolve(s));
    s.once('connect_error', reject);
  });
}

/** Emits a command and returns its answer's data, or throws its error. */
export async function ask<T>(s: Socket, event: string, payload: unknown = {}): Promise<T> {
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

/** Rows of a query on a SQLite file opened read-only (the server has stopped). */
function readRows<T>(file: string, sql: string): Promise<T[]> {
  return new Promise((resolve, reject) => {
    const db = new sqlite3.Database(file, sqlite3.OPEN_READONLY, (err) => {
      if (err) return reject(err);
      db.all(sql, (err2, rows) => {
        db.close();
        if (err2) reject(err2);
        else resolve(rows as T[]);
      });
    });
  });
}

/**
 * What the SQLite file holds against what the phones sent and were acknowledged, by client id: `lost` are
 * acknowledged votes without a receipt; `duplicates` are receipts of one client id more than once plus dots
 * counted beyond the receipts (every dot of the bench adds one); `unknown` are receipts nobody sent.
 */
async function checkFile(file: string, sent: string[], acked: string[]) {
  const receipts = await readRows<{ clientId: string }>(file, 'SELECT clientId FROM vote_receipts');
  const [{ n: dots }] = await readRows<{ n: number }>(file, 'SELECT COALESCE(SUM(count), 0) AS n FROM vote_dots');
  const onDisk = new Set(receipts.map((r) => r.clientId));
  const sentSet = new Set(sent);
  return {
    storedDots: Number(dots),
    receipts: receipts.length,
    lost: acked.filter((id) => !onDisk.has(id)).length,
    duplicates: receipts.length - onDisk.size + Math.max(0, Number(dots) - onDisk.size),
    unknown: [...onDisk].filter((id) => !sentSet.has(id)).length,
  };
}

// ---------- the Cairn run ----------
interface Stats {
  heapUsed: number;
  loopDelayP99Ms: number;
  cpuUserMs: number;
  cpuSystemMs: number;
  preemptions: number;
}

async function benchCairn(workers: Worker[]) {
  const child = await startServer('cairn');
  const port = child.ready.port!;
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
  await child.ask('reset', { name: 'join' });
  const joinTimes = await joinAll(workers, port, info.joinCode);
  const joinStats = await child.ask<Stats>('stats');
  await new Promise((r) => setTimeout(r, 1000));
  const heapAfterJoin = await child.ask<number>('gc');

  // Fan-out of an activity change: the facilitator moves between items; every phone times the arrival.
  // The server's CPU and preemptions in these rounds are reported too (BENCH_PROFILE=1 profiles them).
  await child.ask('reset', { name: 'fanout' });
  const fanout: number[] = [];
  const fanoutRounds: number[] = [];
  let payload: unknown = null;
  for (let r = 0; r < WARMUP_ROUNDS + FANOUT_ROUNDS; r++) {
    const index = r % 2 === 0 ? 2 : 3;
    const round1 = await fanOut(workers, { index }, () => ask(facilitator, 'session:goto', { index }));
    // The baseline sends what a phone received: the phone's state, not the console's answer.
    payload = round1.payload;
    if (r >= WARMUP_ROUNDS) {
      fanout.push(...round1.times);
      fanoutRounds.push(round(pct(round1.times, 95)));
    }
    await new Promise((r2) => setTimeout(r2, 200));
  }

  const fanoutStats = await child.ask<Stats>('stats');
  // The burst: every phone spends its dots within the window, each at a random moment.
  const burst = await runBurst({ child, facilitator, workers, dotsEach: DOTS_EACH, windowMs: BURST_MS, ask, voteIndex, now });
  const burstStats = await child.ask<Stats>('stats');
  const heapAfterBurst = await child.ask<number>('gc');

  await Promise.all(workers.map((w) => w.ask('close')));
  facilitator.disconnect();
  // Stop the server, then read what its file holds.
  const stopped = await child.ask<{ dataDir: string; databasePath: string }>('close');
  const onDisk = await checkFile(stopped.databasePath, burst.sentIds, burst.ackedIds);
  fs.rmSync(stopped.dataDir, { recursive: true, force: true });
  return {
    joinTimes,
    heapPerPhone: (heapAfterJoin - heapBefore) / PHONES,
    heapPerPhoneAfterBurst: (heapAfterBurst - heapBefore) / PHONES,
    fanout,
    fanoutRounds,
    fanoutStats,
    payload,
    burst,
    onDisk,
    burstStats,
    cpuPerJoinMs: (joinStats.cpuUserMs + joinStats.cpuSystemMs) / PHONES,
  };
}

// ---------- the baseline ----------
async function benchBare(workers: Worker[], payload: unknown) {
  const child = await startServer('bare');
  const heapBefore = await child.ask<number>('gc');
  await child.ask('reset', { name: 'join' });
  const joinTimes = await joinAll(workers, child.ready.port!, null);
  const joinStats = await child.ask<Stats>('stats');
  await new Promise((r) => setTimeout(r, 1000));
  const heapAfterJoin = await child.ask<number>('gc');
  await child.ask('reset', { name: 'fanout' });
  const fanout: number[] = [];
  const fanoutRounds: number[] = [];
  for (let r = 0; r < WARMUP_ROUNDS + FANOUT_ROUNDS; r++) {
    const version = 1_000_000 + r;
    const { times } = await fanOut(workers, { version }, () => child.ask('broadcast', { ...(payload as object), version }));
    if (r >= WARMUP_ROUNDS) {
      fanout.push(...times);
      fanoutRounds.push(round(pct(times, 95)));
    }
    await new Promise((r2) => setTimeout(r2, 200));
  }
  const fanoutStats = await child.ask<Stats>('stats');
  await child.ask('reset');
  const burst = await runBareBurst({ workers, dotsEach: DOTS_EACH, windowMs: BURST_MS, now });
  const burstStats = await child.ask<Stats>('stats');
  const heapAfterBurst = await child.ask<number>('gc');
  await Promise.all(workers.map((w) => w.ask('close')));
  await child.ask('close');
  return {
    joinTimes,
    heapPerPhone: (heapAfterJoin - heapBefore) / PHONES,
    heapPerPhoneAfterBurst: (heapAfterBurst - heapBefore) / PHONES,
    fanout,
    fanoutRounds,
    fanoutStats,
    burst,
    burstStats,
    cpuPerJoinMs: (joinStats.cpuUserMs + joinStats.cpuSystemMs) / PHONES,
  };
}

// ---------- the passes together ----------
type CairnPass = Awaited<ReturnType<typeof benchCairn>>;
type BarePass = Awaited<ReturnType<typeof benchBare>>;

const sum = (values: number[]) => values.reduce((a, b) => a + b, 0);
const mean = (values: number[]) => sum(values) / Math.max(1, values.length);

/** Several windows' server figures as one: CPU and preemptions added up, the event loop's worst p99. */
function addStats(list: Stats[]): Stats {
  return {
    heapUsed: Math.max(...list.map((s) => s.heapUsed)),
    loopDelayP99Ms: Math.max(...list.map((s) => s.loopDelayP99Ms)),
    cpuUserMs: sum(list.map((s) => s.cpuUserMs)),
    cpuSystemMs: sum(list.map((s) => s.cpuSystemMs)),
    preemptions: sum(list.map((s) => s.preemptions)),
  };
}

/** What both servers' passes share, as one run: every join and fan-out sample, the windows' CPU added up, the heap's mean. */
function poolShared(passes: (CairnPass | BarePass)[]) {
  return {
    joinTimes: passes.flatMap((p) => p.joinTimes),
    heapPerPhone: mean(passes.map((p) => p.heapPerPhone)),
    heapPerPhoneAfterBurst: mean(passes.map((p) => p.heapPerPhoneAfterBurst)),
    fanout: passes.flatMap((p) => p.fanout),
    fanoutRounds: passes.flatMap((p) => p.fanoutRounds),
    fanoutStats: addStats(passes.map((p) => p.fanoutStats)),
    burstStats: addStats(passes.map((p) => p.burstStats)),
    cpuPerJoinMs: mean(passes.map((p) => p.cpuPerJoinMs)),
  };
}

/** Cairn's passes as one run: besides what both share, the bursts' counts added up and the tally's slowest lag. */
function poolCairn(passes: CairnPass[]): CairnPass {
  const bursts = passes.map((p) => p.burst);
  return {
    ...poolShared(passes),
    payload: passes[passes.length - 1]!.payload,
    burst: {
      kind: bursts[0]!.kind,
      sent: sum(bursts.map((b) => b.sent)),
      acked: sum(bursts.map((b) => b.acked)),
      refused: sum(bursts.map((b) => b.refused)),
      timedOut: sum(bursts.map((b) => b.timedOut)),
      busyErrors: sum(bursts.map((b) => b.busyErrors)),
      acks: bursts.flatMap((b) => b.acks),
      sentIds: bursts.flatMap((b) => b.sentIds),
      ackedIds: bursts.flatMap((b) => b.ackedIds),
      storedWhileRunning: sum(bursts.map((b) => b.storedWhileRunning)),
      tallyLagMs: Math.max(...bursts.map((b) => b.tallyLagMs)),
    },
    onDisk: {
      storedDots: sum(passes.map((p) => p.onDisk.storedDots)),
      receipts: sum(passes.map((p) => p.onDisk.receipts)),
      lost: sum(passes.map((p) => p.onDisk.lost)),
      duplicates: sum(passes.map((p) => p.onDisk.duplicates)),
      unknown: sum(passes.map((p) => p.onDisk.unknown)),
    },
  };
}

/** The bare server's passes as one run. */
function poolBare(passes: BarePass[]): BarePass {
  return { ...poolShared(passes), burst: { acked: sum(passes.map((p) => p.burst.acked)), acks: passes.flatMap((p) => p.burst.acks) } };
}

/** Server CPU in ms per acknowledged vote over a burst's window. */
function cpuPerAck(stats: Stats, acked: number): number {
  return (stats.cpuUserMs + stats.cpuSystemMs) / Math.max(1, acked);
}

/** The targets' measures of one pass, or of the passes pooled: each pass's are printed and kept in the JSON. */
function passFigures(c: CairnPass, b: BarePass) {
  return {
    join_p95_ms: round(pct(c.joinTimes, 95)),
    baseline_join_p95_ms: round(pct(b.joinTimes, 95)),
    join_ratio_p95: round(pct(c.joinTimes, 95) / pct(b.joinTimes, 95), 2),
    fanout_p95_ms: round(pct(c.fanout, 95)),
    baseline_fanout_p95_ms: round(pct(b.fanout, 95)),
    fanout_ratio_p95: round(pct(c.fanout, 95) / pct(b.fanout, 95), 2),
    ack_p99_ms: round(pct(c.burst.acks, 99)),
    cpu_per_acked_vote_ms: round(cpuPerAck(c.burstStats, c.burst.acked), 3),
    baseline_cpu_per_ack_ms: round(cpuPerAck(b.burstStats, b.burst.acked), 3),
    lost: c.onDisk.lost,
    duplicates: c.onDisk.duplicates,
    unknown_receipts: c.onDisk.unknown,
  };
}
type PassFigures = ReturnType<typeof passFigures>;

// ---------- report ----------
/** The machine's CPU time so far as Linux counts it (/proc/stat): all of it and what the hypervisor took for others; `null` elsewhere. */
function machineCpu(): { total: number; steal: number } | null {
  try {
    const ticks = fs.readFileSync('/proc/stat', 'utf8').split('\n')[0]!.trim().split(/\s+/).slice(1).map(Number);
    // user nice system idle iowait irq softirq steal (proc(5)); guest time is already within user.
    return { total: ticks.slice(0, 8).reduce((a, b) => a + b, 0), steal: ticks[7] ?? 0 };
  } catch {
    return null;
  }
}

/** Server CPU in ms per fan-out round (its rounds and the pauses between them), over every counted pass. */
function perRound(stats: Stats): number {
  return round((stats.cpuUserMs + stats.cpuSystemMs) / ((WARMUP_ROUNDS + FANOUT_ROUNDS) * PASSES), 1);
}

async function main(): Promise<void> {
  const load = os.loadavg().map((n) => round(n, 2));
  const cpuAtStart = machineCpu();
  console.log(
    `Cairn benchmark: ${PHONES} phones from ${CLIENT_WORKERS} client workers on ${os.cpus().length} cores (${os.cpus()[0]?.model ?? 'unknown CPU'}), Node ${process.version}, load average ${load.join(' ')}`,
  );
  const workers = await startWorkers();
  const warmups: { fanoutP95: number; baselineFanoutP95: number; joinP95: number; baselineJoinP95: number }[] = [];
  for (let k = 0; k < WARMUP_PASSES; k++) {
    const c = await benchCairn(workers);
    const b = await benchBare(workers, c.payload);
    const pass = { fanoutP95: round(pct(c.fanout, 95)), baselineFanoutP95: round(pct(b.fanout, 95)), joinP95: round(pct(c.joinTimes, 95)), baselineJoinP95: round(pct(b.joinTimes, 95)) };
    warmups.push(pass);
    console.log(`warm-up pass ${k + 1} (not counted): fan-out p95 ${pass.fanoutP95} ms (bare ${pass.baselineFanoutP95}), join p95 ${pass.joinP95} ms (bare ${pass.baselineJoinP95})`);
  }
  const cairnPasses: CairnPass[] = [];
  const barePasses: BarePass[] = [];
  const passes: PassFigures[] = [];
  for (let k = 0; k < PASSES; k++) {
    const c = await benchCairn(workers);
    const b = await benchBare(workers, c.payload);
    cairnPasses.push(c);
    barePasses.push(b);
    const f = passFigures(c, b);
    passes.push(f);
    console.log(
      `pass ${k + 1} of ${PASSES}: CPU per acked vote ${f.cpu_per_acked_vote_ms} ms (bare ${f.baseline_cpu_per_ack_ms}), join p95 ${f.join_p95_ms} ms (bare ${f.baseline_join_p95_ms}, ratio ${f.join_ratio_p95}), fan-out p95 ${f.fanout_p95_ms} ms (bare ${f.baseline_fanout_p95_ms}, ratio ${f.fanout_ratio_p95}), ack p99 ${f.ack_p99_ms} ms, lost / duplicates / unknown ${f.lost} / ${f.duplicates} / ${f.unknown_receipts}`,
    );
  }
  const cairn = poolCairn(cairnPasses);
  const bare = poolBare(barePasses);
  for (const w of workers) w.proc.kill();
  const cpuAtEnd = machineCpu();
  const cpuMs = cairn.burstStats.cpuUserMs + cairn.burstStats.cpuSystemMs;
  const result = {
    phones: PHONES,
    client_workers: CLIENT_WORKERS,
    // The figures below are over these passes together; each pass's own are in `passes`.
    counted_passes: PASSES,
    passes,
    // The passes run before the measured one, with the phones' processes still cold (not in the figures below).
    warmup_passes: warmups,
    machine: { cores: os.cpus().length, cpu: os.cpus()[0]?.model ?? '', memoryGiB: round(os.totalmem() / 2 ** 30), node: process.version },
    load_average_at_start: load,
    load_average_at_end: os.loadavg().map((n) => round(n, 2)),
    // The share of the machine's CPU time the hypervisor gave to other guests during the run (a virtual machine's noise).
    cpu_steal_percent: cpuAtStart && cpuAtEnd ? round((100 * (cpuAtEnd.steal - cpuAtStart.steal)) / Math.max(1, cpuAtEnd.total - cpuAtStart.total), 1) : null,
    // The targets' measures over the passes together, worked out as each pass's own are.
    ...passFigures(cairn, bare),
    server_cpu_per_join_ms: round(cairn.cpuPerJoinMs, 2),
    baseline_server_cpu_per_connect_ms: round(bare.cpuPerJoinMs, 2),
    fanout_p50_ms: round(pct(cairn.fanout, 50)),
    fanout_p99_ms: round(pct(cairn.fanout, 99)),
    baseline_fanout_p50_ms: round(pct(bare.fanout, 50)),
    baseline_fanout_p99_ms: round(pct(bare.fanout, 99)),
    // Each measured round's p95 on its own (ms), to tell a steady gap from one slow round.
    fanout_round_p95_ms: cairn.fanoutRounds,
    baseline_fanout_round_p95_ms: bare.fanoutRounds,
    fanout_payload_bytes: Buffer.byteLength(JSON.stringify(cairn.payload)),
    // What each server spent on a round, and how often the phones' processes took its core meanwhile: the
    // rounds' p95 follows the preemptions more than the server's own work.
    fanout_server_cpu_per_round_ms: perRound(cairn.fanoutStats),
    baseline_fanout_server_cpu_per_round_ms: perRound(bare.fanoutStats),
    fanout_server_preemptions: cairn.fanoutStats.preemptions,
    baseline_fanout_server_preemptions: bare.fanoutStats.preemptions,
    burst_kind: cairn.burst.kind,
    ack_p50_ms: round(pct(cairn.burst.acks, 50)),
    votes_sent: cairn.burst.sent,
    votes_acked: cairn.burst.acked,
    votes_stored: cairn.onDisk.storedDots,
    receipts_on_disk: cairn.onDisk.receipts,
    busy_errors: cairn.burst.busyErrors,
    votes_refused: cairn.burst.refused,
    votes_unacknowledged_in_60s: cairn.burst.timedOut,
    tally_lag_ms: round(cairn.burst.tallyLagMs),
    heap_per_phone_bytes: Math.round(cairn.heapPerPhone),
    baseline_heap_per_phone_bytes: Math.round(bare.heapPerPhone),
    heap_ratio: round(cairn.heapPerPhone / bare.heapPerPhone, 2),
    heap_per_phone_after_burst_bytes: Math.round(cairn.heapPerPhoneAfterBurst),
    baseline_heap_per_phone_after_burst_bytes: Math.round(bare.heapPerPhoneAfterBurst),
    heap_ratio_after_burst: round(cairn.heapPerPhoneAfterBurst / bare.heapPerPhoneAfterBurst, 2),
    loop_delay_p99_ms: round(cairn.burstStats.loopDelayP99Ms),
    cpu_burst_ms: round(cpuMs),
    cpu_burst_user_ms: round(cairn.burstStats.cpuUserMs),
    cpu_burst_system_ms: round(cairn.burstStats.cpuSystemMs),
    cpu_per_stored_vote_ms: round(cpuMs / Math.max(1, cairn.onDisk.storedDots), 3),
    baseline_ack_p99_ms: round(pct(bare.burst.acks, 99)),
    targets: {} as Record<string, boolean>,
  };
  // Each target once: whether the passes together meet it, and the pass figure printed beside it (if any).
  const targets: [label: string, met: boolean, perPass?: keyof PassFigures][] = [
    ['fan-out p95 ≤ 1.5 × baseline', result.fanout_ratio_p95 <= 1.5, 'fanout_ratio_p95'],
    ['join p95 ≤ 3 × bare connect p95', result.join_ratio_p95 <= 3, 'join_ratio_p95'],
    ['vote ack p99 < 250 ms', result.ack_p99_ms < 250, 'ack_p99_ms'],
    ['server CPU ≤ 0.4 ms per acknowledged vote', result.cpu_per_acked_vote_ms <= 0.4, 'cpu_per_acked_vote_ms'],
    ['tally equals stored within 1 s', result.tally_lag_ms <= 1000],
    ['heap per phone < 2 × baseline (after joins and after the burst)', result.heap_ratio < 2 && result.heap_ratio_after_burst < 2],
    ['nothing lost or duplicated (by client id, in the SQLite file)', result.lost === 0 && result.duplicates === 0 && result.unknown_receipts === 0],
  ];
  result.targets = Object.fromEntries(targets.map(([label, met]) => [label, met]));
  const rows: [string, string, string][] = [
    ['phones / client workers / counted passes', `${PHONES} / ${CLIENT_WORKERS} / ${PASSES}`, ''],
    ['join p95 (HTTP join + socket + sync)', `${result.join_p95_ms} ms`, `${result.baseline_join_p95_ms} ms connect (ratio ${result.join_ratio_p95}, ≤ 3)`],
    ['server CPU per join', `${result.server_cpu_per_join_ms} ms`, `${result.baseline_server_cpu_per_connect_ms} ms per bare connect`],
    ['fan-out p50 / p95 / p99', `${result.fanout_p50_ms} / ${result.fanout_p95_ms} / ${result.fanout_p99_ms} ms`, `${result.baseline_fanout_p50_ms} / ${result.baseline_fanout_p95_ms} / ${result.baseline_fanout_p99_ms} ms`],
    ['fan-out ratio p95', `${result.fanout_ratio_p95} (${result.fanout_payload_bytes} B message)`, '≤ 1.5'],
    [
      'fan-out: server CPU per round / preemptions',
      `${result.fanout_server_cpu_per_round_ms} ms / ${result.fanout_server_preemptions}`,
      `${result.baseline_fanout_server_cpu_per_round_ms} ms / ${result.baseline_fanout_server_preemptions}`,
    ],
    [`${result.burst_kind} burst: ack p50 / p99`, `${result.ack_p50_ms} / ${result.ack_p99_ms} ms`, `bare p99 ${result.baseline_ack_p99_ms} ms; target p99 < 250 ms`],
    ['sent / acked / dots on disk / receipts', `${result.votes_sent} / ${result.votes_acked} / ${result.votes_stored} / ${result.receipts_on_disk}`, ''],
    ['lost / duplicates / unknown (by client id)', `${result.lost} / ${result.duplicates} / ${result.unknown_receipts}`, '0 / 0 / 0'],
    ['SQLITE_BUSY / refused / no ack within 60 s', `${result.busy_errors} / ${result.votes_refused} / ${result.votes_unacknowledged_in_60s}`, '0 / 0 / 0'],
    ['console tally lag', `${result.tally_lag_ms} ms`, '≤ 1000 ms'],
    ['heap per phone after joins', `${result.heap_per_phone_bytes} B`, `${result.baseline_heap_per_phone_bytes} B (ratio ${result.heap_ratio}, < 2)`],
    ['heap per phone after the burst', `${result.heap_per_phone_after_burst_bytes} B`, `${result.baseline_heap_per_phone_after_burst_bytes} B (ratio ${result.heap_ratio_after_burst}, < 2)`],
    ['event-loop delay p99 (burst)', `${result.loop_delay_p99_ms} ms`, ''],
    ['server CPU during the votes', `${result.cpu_burst_ms} ms (${result.cpu_per_acked_vote_ms} ms per acked vote, ${result.cpu_per_stored_vote_ms} per stored)`, `bare ${result.baseline_cpu_per_ack_ms} ms per ack; target ≤ 0.4 ms per vote`],
    ['load average at start / end', `${result.load_average_at_start.join(' ')} / ${result.load_average_at_end.join(' ')}`, ''],
    ['CPU time stolen by the hypervisor', result.cpu_steal_percent === null ? 'not known' : `${result.cpu_steal_percent} %`, ''],
  ];
  const w0 = Math.max(...rows.map((r) => r[0].length));
  const w1 = Math.max(...rows.map((r) => r[1].length));
  console.log(`\n${'measure'.padEnd(w0)}  ${'Cairn'.padEnd(w1)}  baseline / target`);
  for (const [a, b, c] of rows) console.log(`${a.padEnd(w0)}  ${b.padEnd(w1)}  ${c}`);
  console.log(`\ntargets (over ${PASSES} passes together; each pass's own figure in brackets):`);
  for (const [label, met, key] of targets) {
    console.log(`  ${met ? 'met    ' : 'MISSED '} ${label}${key ? ` [${passes.map((f) => f[key]).join(', ')}]` : ''}`);
  }
  fs.mkdirSync(path.dirname(JSON_FILE), { recursive: true });
  fs.writeFileSync(JSON_FILE, JSON.stringify(result, null, 2));
  console.log(`\nwritten: ${JSON_FILE}`);
  process.exit(0);
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
