import { notePartsFor } from '../../shared/activities';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import crypto from 'node:crypto';
import { io as ioClient } from 'socket.io-client';
import { DEMO_ACCOUNTS, DEMO_WORKSHOP_TITLE } from '../../server/db/seed';
import { command, type ClientSocket } from './helpers';
import { freePort, startCairnProcess, type CairnProcess } from './process';
import type { LiveState, LiveSessionInfo, JoinAnswer } from '../../shared/schemas/live';
import type { WorkshopSummary } from '../../shared/schemas/workshop';

// Small enough for CI, large enough that the kill lands in the middle of the burst.
const PHONES = 20;
const NOTES_EACH = 5;

let dataDir: string;
let port: number;
let server: CairnProcess;
let token: string;
let info: LiveSessionInfo;
const phones: { socket: ClientSocket; answer: JoinAnswer }[] = [];
let facilitator: ClientSocket;

async function api<T>(method: string, url: string, body?: unknown, auth?: string): Promise<T> {
  const res = await fetch(`${server.baseUrl}/api${url}`, {
    method,
    headers: { 'Content-Type': 'application/json', ...(auth ? { Authorization: `Bearer ${auth}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${method} ${url} answered ${res.status}: ${await res.text()}`);
  return (await res.json()) as T;
}

/** A phone's socket that reconnects by itself, as the real client does. */
function openReconnecting(tok: string): ClientSocket {
  return ioClient(server.baseUrl, {
    auth: { token: tok },
    transports: ['websocket'],
    reconnection: true,
    reconnectionDelay: 100,
    reconnectionDelayMax: 500,
    forceNew: true,
  });
}

function connected(s: ClientSocket): Promise<void> {
  return s.connected ? Promise.resolve() : new Promise((resolve) => s.once('connect', () => resolve()));
}

beforeAll(async () => {
  dataDir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-faults-'));
  port = await freePort();
  server = await startCairnProcess(dataDir, port);
  token = (await api<{ accessToken: string }>('POST', '/auth/sign-in', {
    email: DEMO_ACCOUNTS.facilitator.email,
    password: DEMO_ACCOUNTS.facilitator.password,
  })).accessToken;
  const demo = (await api<WorkshopSummary[]>('GET', '/workshops', undefined, token)).find((w) => w.title === DEMO_WORKSHOP_TITLE)!;
  info = await api<LiveSessionInfo>('POST', `/workshops/${demo.id}/live`, {}, token);
  facilitator = openReconnecting(token);
  await connected(facilitator);
  await command(facilitator, 'session:watch', { sessionId: info.sessionId });
  for (let i = 0; i < PHONES; i++) {
    const answer = await api<JoinAnswer>('POST', `/join/${info.joinCode}`, {
      displayName: `Rider ${i + 1}`,
      photoConsent: i % 2 === 0,
      deviceId: `fault-device-${i}-${crypto.randomUUID()}`,
    });
    const socket = openReconnecting(answer.token);
    phones.push({ socket, answer });
  }
  await Promise.all(phones.map((p) => connected(p.socket)));
}, 60_000);

afterAll(async () => {
  for (const p of phones) p.socket.disconnect();
  facilitator?.disconnect();
  await server?.stop();
  await fs.rm(dataDir, { recursive: true, force: true });
});

describe('a hard kill of the server in the middle of the room', () => {
  it('keeps every acknowledged submission, adds no duplicate on retry, resumes the item and the timer, and serves the reconnect storm', async () => {
    // Move to the first note-taking activity and start its countdown.
    await command(facilitator, 'session:goto', { index: 2 });
    const before = ((await command(facilitator, 'timer:start', {})) as { data: LiveState }).data;
    expect(before.timer.status).toBe('running');
    const itemId = before.item!.id;
    // Filed under the activity's first part, as the phone files it.
    const part = notePartsFor(before.item!.type, before.item!.settings)[0]?.id;

    // Every phone sends its notes; the server is killed once about half are acknowledged.
    const sent = phones.flatMap((p, i) =>
      Array.from({ length: NOTES_EACH }, (_, k) => ({ phone: p, input: { clientId: `fault-${i}-${k}-${crypto.randomUUID()}`, itemId, kind: 'note', text: `Note ${k + 1} from rider ${i + 1}: the saddle was too high`, ...(part ? { part } : {}) } })),
    );
    const acknowledged = new Set<string>();
    let killed: Promise<void> | null = null;
    const tries = sent.map(async ({ phone, input }) => {
      const answer = await command(phone.socket, 'submission:create', input).catch(() => null);
      if (answer && 'data' in answer) acknowledged.add(input.clientId);
      if (acknowledged.size >= sent.length / 2 && !killed) killed = server.kill();
    });
    await Promise.all(tries);
    if (!killed) killed = server.kill();
    await killed;
    expect(acknowledged.size).toBeGreaterThan(0);

    // Restart on the same data folder and port: the phones come back by themselves, all at once.
    server = await startCairnProcess(dataDir, port);
    await Promise.all([...phones.map((p) => connected(p.socket)), connected(facilitator)]);
    const storm = await Promise.all(phones.map((p) => command(p.socket, 'session:sync', {})));
    for (const answer of storm) {
      expect('data' in answer).toBe(true);
      if ('data' in answer) expect(answer.data.item?.id).toBe(itemId);
    }
    const after = storm.find((a) => 'data' in a) as { data: LiveState };
    // The timer runs on from the same end time (server epoch ms): nothing is lost by the restart.
    expect(after.data.timer.status).toBe('running');
    expect(after.data.timer.endsAt).toBe(before.timer.endsAt);

    // Each phone resends everything (as its offline queue would): the acknowledged ones are not stored twice.
    await command(facilitator, 'session:watch', { sessionId: info.sessionId });
    const retries = await Promise.all(sent.map(({ phone, input }) => command(phone.socket, 'submission:create', input)));
    for (const [i, answer] of retries.entries()) {
      expect('data' in answer).toBe(true);
      if ('data' in answer && acknowledged.has(sent[i]!.input.clientId)) expect(answer.data.duplicate).toBe(true);
    }
    const stored = await command(facilitator, 'submission:list', { itemId });
    expect('data' in stored).toBe(true);
    if ('data' in stored) {
      expect(stored.data.length).toBe(sent.length);
      const texts = new Set(stored.data.map((s) => s.text));
      for (const s of sent) expect(texts.has(s.input.text)).toBe(true);
    }
  }, 90_000);

  it('keeps every acknowledged dot of a vote burst through a hard kill, and a resend adds none twice', async () => {
    // The dot vote of the demo agenda ("Pick the challenges"), four options, five dots each.
    const demo = (await api<WorkshopSummary[]>('GET', '/workshops', undefined, token)).find((w) => w.title === DEMO_WORKSHOP_TITLE)!;
    const agenda = (await api<{ agenda: { type: string }[] }>('GET', `/workshops/${demo.id}`, undefined, token)).agenda;
    await command(facilitator, 'session:goto', { index: agenda.findIndex((i) => i.type === 'dot_vote') });
    const setup = (await command(facilitator, 'vote:setup', {
      options: [{ text: 'Unlock with one tap' }, { text: 'Saddle guide at the dock' }, { text: 'Free dock finder' }, { text: 'A ride buddy' }],
      rules: { dotsPerVoter: NOTES_EACH, capPerOption: NOTES_EACH, allowStacking: true, criteria: [] },
    })) as { data: { options: { id: string }[] } };
    await command(facilitator, 'vote:open', {});
    const optionIds = setup.data.options.map((o) => o.id);

    const sent = phones.flatMap((p, i) =>
      Array.from({ length: NOTES_EACH }, (_, k) => ({
        phone: p,
        input: { clientId: `dot-${i}-${k}-${crypto.randomUUID()}`.slice(0, 64), optionId: optionIds[(i + k) % 4], criterionId: 'overall', delta: 1 },
      })),
    );
    const acknowledged = new Set<string>();
    let killed: Promise<void> | null = null;
    await Promise.all(
      sent.map(async ({ phone, input }) => {
        const answer = await command(phone.socket, 'vote:dot', input).catch(() => null);
        if (answer && 'data' in answer) acknowledged.add(input.clientId);
        if (acknowledged.size >= sent.length / 2 && !killed) killed = server.kill();
      }),
    );
    if (!killed) killed = server.kill();
    await killed;
    expect(acknowledged.size).toBeGreaterThan(0);

    server = await startCairnProcess(dataDir, port);
    await Promise.all([...phones.map((p) => connected(p.socket)), connected(facilitator)]);
    await command(facilitator, 'session:watch', { sessionId: info.sessionId });
    // Every phone resends all its dots with the same ids: what was stored before the kill answers as a duplicate.
    const retries = await Promise.all(sent.map(({ phone, input }) => command(phone.socket, 'vote:dot', input)));
    for (const [i, answer] of retries.entries()) {
      expect('data' in answer).toBe(true);
      if ('data' in answer && acknowledged.has(sent[i]!.input.clientId)) expect(answer.data.duplicate).toBe(true);
    }
    const results = (await command(facilitator, 'vote:results', {})) as { data: { overall: { dots: number }[] } };
    expect(results.data.overall.reduce((sum, r) => sum + r.dots, 0)).toBe(sent.length);
  }, 90_000);
});
