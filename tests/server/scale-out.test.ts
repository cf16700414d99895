import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { spawn, spawnSync, type ChildProcess } from 'node:child_process';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import crypto from 'node:crypto';
import { command, commandData, demoWorkshop, joinLive, nextEvent, startLive, startTestApp, type TestApp } from './helpers';
import { OVERALL_CRITERION } from '../../shared/tally';
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

  it('a console on process B hears who joined on process A: rooms are never skipped for want of a local listener while broadcasts are shared', async () => {
    const token = await a.tokenFor('facilitator');
    const info = await startLive(a, token, (await demoWorkshop(a)).id);
    const facilitator = await b.connect(token);
    await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
    const joined = await joinLive(a, info.joinCode, { displayName: 'Iris' });
    const heard = nextEvent(facilitator, 'participants:updated', (list) => list.some((p) => p.id === joined.me.id && p.online), 5000);
    const phone = await a.connect(joined.token);
    await commandData(phone, 'session:sync');
    expect((await heard).find((p) => p.id === joined.me.id)?.displayName).toBe('Iris');
  });

  it("keeps one participant's budget and the vote's close across processes: each reads the other's commits", async () => {
    const token = await a.tokenFor('facilitator');
    const demo = await demoWorkshop(a);
    const info = await startLive(a, token, demo.id);
    const types = await a.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId: demo.id }, order: [['position', 'ASC']] });
    const facilitator = await a.connect(token);
    await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
    await commandData(facilitator, 'session:goto', { index: types.findIndex((i) => i.type === 'dot_vote') });
    const vote = await commandData(facilitator, 'vote:setup', {
      options: [{ text: 'Unlock with one tap' }, { text: 'Free dock finder' }],
      rules: { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, criteria: [] },
    });
    await commandData(facilitator, 'vote:open');
    const option = vote.options[0]!.id;
    // One participant with a phone on each process.
    const joined = await joinLive(a, info.joinCode, { displayName: 'Remy' });
    const onA = await a.connect(joined.token);
    const onB = await b.connect(joined.token);
    const dot = (phone: typeof onA, delta: 1 | -1, optionId = option) =>
      command(phone, 'vote:dot', { clientId: crypto.randomUUID(), optionId, criterionId: OVERALL_CRITERION, delta });
    const code = (answer: Awaited<ReturnType<typeof dot>>) => ('error' in answer ? answer.error.code : null);
    expect(code(await dot(onA, 1))).toBeNull();
    expect(code(await dot(onA, 1))).toBeNull();
    expect(code(await dot(onB, 1))).toBeNull();
    // Process A last saw two dots; B's commit is on disk, so a fourth (on the other option) is over the budget of 3.
    expect(code(await dot(onA, 1, vote.options[1]!.id))).toBe('budget_exceeded');
    const stored = await a.cairn.ctx.db.models.VoteDot.findAll({ where: { participantId: joined.me.id } });
    expect(stored.map((d) => d.count)).toEqual([3]);
    // Closed on A: process B, which saw the vote open, refuses the next change.
    await commandData(facilitator, 'vote:close');
    expect(code(await dot(onB, -1))).toBe('conflict');
    expect((await a.cairn.ctx.db.models.VoteDot.findAll({ where: { participantId: joined.me.id } })).map((d) => d.count)).toEqual([3]);
  });
});
