import { notePartsFor } from '../../shared/activities';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { remainingMs } from '../../shared/clock';
import type { LiveSessionInfo, LiveState } from '../../shared/schemas/live';
import { commandData, demoWorkshop, joinLive, startLive, startTestApp, type TestApp } from './helpers';

let dataDir: string;
const open: TestApp[] = [];

beforeAll(async () => {
  dataDir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-restart-'));
});
afterAll(async () => {
  for (const t of open) await t.close().catch(() => undefined);
  await fs.rm(dataDir, { recursive: true, force: true });
});

/** Builds Cairn on the shared data folder, as a restarted server would be. */
async function boot(): Promise<TestApp> {
  const t = await startTestApp({ DATA_DIR: dataDir });
  open.push(t);
  return t;
}

/** Closes an app the way a stopped server closes. */
async function shutDown(t: TestApp): Promise<void> {
  await t.close();
  open.splice(open.indexOf(t), 1);
}

/** A facilitator socket watching the session. */
async function watchAsFacilitator(t: TestApp, sessionId: string) {
  const socket = await t.connect(await t.tokenFor('facilitator'));
  const state = await commandData(socket, 'session:watch', { sessionId });
  return { socket, state };
}

describe('a live session survives a server restart', () => {
  let info: LiveSessionInfo;
  let phoneToken: string;
  let itemIds: string[];
  let running: LiveState;
  let submissionId: string;
  let runningSeenAt: number;

  it('runs: start, advance, start the timer, take a note', async () => {
    const t = await boot();
    itemIds = (await demoWorkshop(t)).itemIds;
    info = await startLive(t, await t.tokenFor('facilitator'), (await demoWorkshop(t)).id);
    const phone = await joinLive(t, info.joinCode, { displayName: 'Priya Nair', photoConsent: true });
    phoneToken = phone.token;
    const { socket } = await watchAsFacilitator(t, info.sessionId);
    await commandData(socket, 'session:next');
    await commandData(socket, 'session:next');
    running = await commandData(socket, 'timer:start');
    runningSeenAt = Date.now();
    expect(running.currentIndex).toBe(2);
    expect(running.timer.status).toBe('running');

    const phoneSocket = await t.connect(phoneToken);
    const note = await commandData(phoneSocket, 'submission:create', {
      clientId: 'restart-note-0001',
      itemId: running.item!.id,
      kind: 'note',
      part: notePartsFor(running.item!.type, running.item!.settings)[0]?.id,
      text: 'She could not find the unlock button',
    });
    submissionId = note.id;
    await shutDown(t);
  });

  it('resumes the same item with the same running countdown after createApp on the same DATA_DIR', async () => {
    const t = await boot();
    const { state } = await watchAsFacilitator(t, info.sessionId);
    const checkedAt = Date.now();
    expect(state.status).toBe('live');
    expect(state.currentIndex).toBe(2);
    expect(state.item?.id).toBe(itemIds[2]);
    expect(state.version).toBe(running.version);
    expect(state.joinCode).toBe(info.joinCode);
    // The end time is kept in epoch ms, so what is left shrank by exactly the time that passed.
    expect(state.timer).toEqual(running.timer);
    const before = remainingMs(running.timer, running.serverTime);
    const after = remainingMs(state.timer, state.serverTime);
    expect(after).toBeGreaterThan(0);
    expect(before - after).toBeGreaterThanOrEqual(0);
    expect(before - after).toBeLessThanOrEqual(checkedAt - running.serverTime);
    expect(before - after).toBeGreaterThanOrEqual(state.serverTime - runningSeenAt);
    expect(state.participantCount).toBe(1);
  });

  it('lets the phone reconnect with its token, resync, and retry its note without a second copy', async () => {
    const t = open[0]!;
    const phone = await t.connect(phoneToken);
    const synced = await commandData(phone, 'session:sync');
    expect(synced.currentIndex).toBe(2);
    expect(await commandData(phone, 'participant:me')).toMatchObject({ displayName: 'Priya Nair' });
    const retry = await commandData(phone, 'submission:create', {
      clientId: 'restart-note-0001',
      itemId: synced.item!.id,
      kind: 'note',
      part: notePartsFor(synced.item!.type, synced.item!.settings)[0]?.id,
      text: 'She could not find the unlock button',
    });
    expect(retry).toEqual({ id: submissionId, duplicate: true });
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { sessionId: info.sessionId } })).toBe(1);
    // Joining again from a new page load finds the running session by the same code.
    expect((await t.agent.get(`/api/join/${info.joinCode}`)).status).toBe(200);
  });

  it('keeps a paused timer’s exact remaining milliseconds across a restart', async () => {
    const t = open[0]!;
    const { socket } = await watchAsFacilitator(t, info.sessionId);
    const paused = await commandData(socket, 'timer:pause');
    expect(paused.timer.status).toBe('paused');
    await shutDown(t);

    // Time passes while the server is down; a paused countdown does not move.
    await new Promise((r) => setTimeout(r, 50));
    const again = await boot();
    const { socket: console2, state } = await watchAsFacilitator(again, info.sessionId);
    expect(state.timer).toEqual(paused.timer);
    expect(remainingMs(state.timer, state.serverTime)).toBe(paused.timer.remainingMs);

    const before = Date.now();
    const resumed = await commandData(console2, 'timer:resume');
    expect(resumed.timer.endsAt! - paused.timer.remainingMs!).toBeGreaterThanOrEqual(before);
    expect(resumed.timer.endsAt! - paused.timer.remainingMs!).toBeLessThanOrEqual(Date.now());
  });
});
