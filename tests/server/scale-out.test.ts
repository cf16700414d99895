import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { commandData, demoWorkshop, joinLive, nextEvent, startLive, startTestApp, type TestApp } from './helpers';
import { freePort } from './process';

// Debian's redis-server (installed by .ci/run); the test says so and skips where it is missing.
const hasRedis = spawnSync('which', ['redis-server']).status === 0;

describe.skipIf(!hasRedis)('two Cairn processes sharing broadcasts through Redis streams', () => {
  let redis: ChildProcess;
  let dataDir: string;
  let a: TestApp;
  let b: TestApp;

  beforeAll(async () => {
    const port = await freePort();
    redis = spawn('redis-server', ['--port', String(port), '--bind', '127.0.0.1', '--save', '', '--appendonly', 'no'], { stdio: 'ignore' });
    const url = `redis://127.0.0.1:${port}`;
    for (let i = 0; i < 50; i++) {
      if (spawnSync('redis-cli', ['-p', String(port), 'ping']).stdout?.toString().includes('PONG')) break;
      await new Promise((r) => setTimeout(r, 100));
    }
    dataDir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-scale-'));
    // Both share one SQLite file on this machine (WAL, busy timeout, immediate transactions).
    a = await startTestApp({ DATA_DIR: dataDir, REDIS_URL: url });
    b = await startTestApp({ DATA_DIR: dataDir, REDIS_URL: url });
  });

  afterAll(async () => {
    await a?.close();
    await b?.close();
    redis?.kill();
    await fs.rm(dataDir, { recursive: true, force: true });
  });

  it('a phone on process B sees the activity change the facilitator made on process A', async () => {
    const token = await a.tokenFor('facilitator');
    const info = await startLive(a, token, (await demoWorkshop(a)).id);
    const joined = await joinLive(b, info.joinCode, { displayName: 'Remy' });
    const facilitator = await a.connect(token);
    const phone = await b.connect(joined.token);
    await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
    await commandData(phone, 'session:sync');
    const heard = nextEvent(phone, 'session:updated', (s) => s.currentIndex === 1, 3000);
    await commandData(facilitator, 'session:next');
    expect((await heard).currentIndex).toBe(1);
  });
});
