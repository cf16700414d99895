/**
 * One server of the benchmark, in a process of its own so its heap, CPU and event loop are measured
 * alone: `cairn` (the real app on a fresh SQLite file) or `bare` (a plain socket.io server that only
 * joins a room and broadcasts, the baseline). Talks to the benchmark over the IPC channel.
 */
import http from 'node:http';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { monitorEventLoopDelay } from 'node:perf_hooks';
import { Session } from 'node:inspector/promises';
import { writeFileSync, mkdirSync, rmSync, readdirSync, readFileSync } from 'node:fs';
import { Server } from 'socket.io';
import { createApp, type CairnApp } from '../server/app';
import { loadConfig } from '../server/config/env';

// As in server/index.ts: no source-mapped stack traces on the hot path (see there).
process.setSourceMapsEnabled(false);
const mode = process.argv[2] === 'bare' ? 'bare' : 'cairn';
const loop = monitorEventLoopDelay({ resolution: 10 });
loop.enable();
let cpuMark = process.cpuUsage();
let switchMark = process.resourceUsage().involuntaryContextSwitches;

/**
 * CPU time of each thread of this process so far (ms, by thread id), from Linux's /proc: the main thread
 * (id = pid) against the others (V8's compiler and collector helpers, libuv's pool where SQLite runs).
 * Empty where /proc is missing.
 */
function threadCpu(): Map<string, number> {
  const ms = new Map<string, number>();
  try {
    for (const id of readdirSync('/proc/self/task')) {
      const stat = readFileSync(`/proc/self/task/${id}/stat`, 'utf8');
      // After the command name in parentheses: utime and stime are fields 14 and 15 of stat, in clock ticks (100 a second).
      const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
      ms.set(id, (Number(fields[11]) + Number(fields[12])) * 10);
    }
  } catch {
    // Not Linux, or a thread ended while being read: no split this time.
  }
  return ms;
}
let threadMark = threadCpu();
let cairn: CairnApp | null = null;
let profiler: Session | null = null;
let dataDir = '';

type Request = { id: number; type: 'stats' | 'gc' | 'reset' | 'dots' | 'broadcast' | 'close'; payload?: unknown };
/** What the current measuring window is called (the CPU profile's file name). */
let windowName = 'burst';

function reply(id: number, data: unknown): void {
  process.send?.({ id, data });
}

async function main(): Promise<void> {
  let server: http.Server;
  let bareIo: Server | null = null;
  if (mode === 'cairn') {
    dataDir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-bench-'));
    cairn = await createApp(
      loadConfig({ NODE_ENV: 'test', DATA_DIR: dataDir, LOG_LEVEL: 'silent', JWT_SECRET: 'a benchmark secret of at least thirty-two characters', PUBLIC_URL: 'http://127.0.0.1', JOINS_PER_CODE: process.env.BENCH_JOINS_PER_CODE ?? '' }),
    );
    server = cairn.server;
  } else {
    server = http.createServer();
    bareIo = new Server(server, { maxHttpBufferSize: 256 * 1024 });
    bareIo.on('connection', (socket) => {
      void socket.join('room');
      socket.on('ping:ack', (_p: unknown, ack: (a: unknown) => void) => ack({ data: true }));
      // The burst's baseline: every dot acknowledged at once, nothing checked or stored.
      socket.on('vote:dot', (_p: unknown, ack: (a: unknown) => void) => ack({ data: { duplicate: false } }));
    });
  }
  await new Promise<void>((resolve) => server.listen(0, '127.0.0.1', resolve));
  process.send?.({ ready: true, port: (server.address() as AddressInfo).port });

  // The benchmark stopped (finished or failed): so does this server.
  process.on('disconnect', () => {
    if (dataDir) rmSync(dataDir, { recursive: true, force: true });
    process.exit(0);
  });
  process.on('message', async (msg: Request) => {
    switch (msg.type) {
      case 'gc':
        (globalThis as { gc?: () => void }).gc?.();
        reply(msg.id, process.memoryUsage().heapUsed);
        break;
      case 'reset':
        windowName = (msg.payload as { name?: string } | undefined)?.name ?? 'burst';
        // BENCH_PROFILE=1: a CPU profile of the burst alone, for finding the hot path.
        if (process.env.BENCH_PROFILE) {
          profiler = new Session();
          profiler.connect();
          await profiler.post('Profiler.enable');
          await profiler.post('Profiler.start');
        }
        loop.reset();
        cpuMark = process.cpuUsage();
        switchMark = process.resourceUsage().involuntaryContextSwitches;
        threadMark = threadCpu();
        reply(msg.id, true);
        break;
      case 'stats': {
        const cpu = process.cpuUsage(cpuMark);
        // BENCH_THREADS=1: where the window's CPU went, main thread against each other thread (10 ms resolution).
        if (process.env.BENCH_THREADS) {
          const spent = [...threadCpu()].map(([id, ms]) => [id, ms - (threadMark.get(id) ?? 0)] as const).filter(([, ms]) => ms > 0);
          const main = spent.find(([id]) => id === String(process.pid))?.[1] ?? 0;
          const others = spent.filter(([id]) => id !== String(process.pid)).map(([id, ms]) => `${id}:${ms}`);
          console.error(`[threads ${windowName}-${mode}] main ${main} ms; other threads (id:ms) ${others.join(' ')}`);
        }
        if (profiler) {
          const { profile } = await profiler.post('Profiler.stop');
          mkdirSync('.test-output/prof', { recursive: true });
          writeFileSync(`.test-output/prof/${windowName}-${mode}.cpuprofile`, JSON.stringify(profile));
          profiler = null;
        }
        reply(msg.id, {
          heapUsed: process.memoryUsage().heapUsed,
          loopDelayP99Ms: loop.percentile(99) / 1e6,
          cpuUserMs: cpu.user / 1000,
          cpuSystemMs: cpu.system / 1000,
          // Times the kernel took a core from this server for another process (the phones share its cores).
          preemptions: process.resourceUsage().involuntaryContextSwitches - switchMark,
        });
        break;
      }
      case 'dots': {
        // Stored dots: what the benchmark compares its acknowledgements and the console's tally with.
        const rows = (await cairn!.ctx.db.sequelize.query('SELECT COALESCE(SUM(count), 0) AS n FROM vote_dots', { plain: true })) as {
          n: number;
        } | null;
        reply(msg.id, Number(rows?.n ?? 0));
        break;
      }
      case 'broadcast':
        bareIo?.to('room').emit('session:updated', msg.payload);
        reply(msg.id, true);
        break;
      case 'close':
        // The SQLite file stays for bench/run.ts to check against what was acknowledged; it removes the folder.
        if (cairn) await cairn.close();
        else await new Promise<void>((resolve) => bareIo!.close(() => resolve()));
        reply(msg.id, cairn ? { dataDir, databasePath: cairn.ctx.config.databasePath } : null);
        process.exit(0);
    }
  });
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
