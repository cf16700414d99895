import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import crypto from 'node:crypto';
import supertest from 'supertest';
import { io as ioClient, type ManagerOptions, type Socket, type SocketOptions } from 'socket.io-client';
import { createApp, type CairnApp } from '../../server/app';
import { loadConfig } from '../../server/config/env';
import { DEMO_ACCOUNTS, DEMO_WORKSHOP_TITLE } from '../../server/db/seed';
import type { Ack, AckFn, ClientToServerEvents, ServerToClientEvents } from '../../shared/events';
import type { JoinAnswer, LiveSessionInfo } from '../../shared/schemas/live';

/** The signing secret every test app uses, so tests can forge and expire tokens with it. */
export const TEST_SECRET = 'a test secret that is at least thirty-two characters';

/** A typed socket.io client as Cairn's client uses it. */
export type ClientSocket = Socket<ServerToClientEvents, ClientToServerEvents>;

/** A demo account's key in `DEMO_ACCOUNTS`. */
export type DemoRole = keyof typeof DEMO_ACCOUNTS;

/** A Cairn app built for one test file, with a supertest agent and sign-in shortcuts. */
export interface TestApp {
  cairn: CairnApp;
  agent: supertest.Agent;
  /** The data folder (database, dev secret). */
  dataDir: string;
  /** Closes the app and every socket opened through it, then removes the data folder it made. */
  close(): Promise<void>;
  /** Signs in and returns the access token; throws with the server's answer when refused. */
  signIn(email: string, password: string): Promise<string>;
  /** Signs in as one of the demo accounts. */
  tokenFor(role: DemoRole): Promise<string>;
  /** Opens a socket.io client on a random port; resolves once connected, rejects on `connect_error`. */
  connect(token: string | undefined, options?: Partial<ManagerOptions & SocketOptions>): Promise<ClientSocket>;
}

/** An account made for a test, with what is needed to act as it. */
export interface TestAccount {
  id: string;
  email: string;
  password: string;
  token: string;
}

/**
 * Builds Cairn with the demo seeded and logging silenced, on a fresh temporary data folder
 * (or on a `DATA_DIR` override, which is left in place on close for its creator to remove).
 * @example const t = await startTestApp({ ALLOW_SIGNUP: 'true' }); afterAll(() => t.close());
 */
export async function startTestApp(overrides: Record<string, string> = {}): Promise<TestApp> {
  const ownsDir = overrides.DATA_DIR === undefined;
  const dataDir = overrides.DATA_DIR ?? (await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-test-')));
  const config = loadConfig({
    NODE_ENV: 'test',
    DATA_DIR: dataDir,
    LOG_LEVEL: 'silent',
    JWT_SECRET: TEST_SECRET,
    ...overrides,
  });
  const cairn = await createApp(config);
  const agent = supertest(cairn.express);
  const sockets: ClientSocket[] = [];

  const signIn = async (email: string, password: string) => {
    const res = await agent.post('/api/auth/sign-in').send({ email, password });
    if (res.status !== 200) throw new Error(`sign-in as ${email} answered ${res.status}: ${JSON.stringify(res.body)}`);
    return res.body.accessToken as string;
  };

  return {
    cairn,
    agent,
    dataDir,
    async close() {
      for (const s of sockets) s.disconnect();
      await cairn.close();
      if (ownsDir) await fs.rm(dataDir, { recursive: true, force: true });
    },
    signIn,
    tokenFor: (role) => signIn(DEMO_ACCOUNTS[role].email, DEMO_ACCOUNTS[role].password),
    async connect(token, options = {}) {
      const socket = openSocket(await listen(cairn), token, options);
      sockets.push(socket);
      return new Promise<ClientSocket>((resolve, reject) => {
        socket.once('connect', () => resolve(socket));
        socket.once('connect_error', (err) => {
          socket.disconnect();
          reject(err);
        });
      });
    },
  };
}

/** Makes the app's HTTP server listen on a random loopback port (once) and returns its base URL. */
export async function listen(cairn: CairnApp): Promise<string> {
  if (!cairn.server.listening) {
    await new Promise<void>((resolve) => cairn.server.listen(0, '127.0.0.1', resolve));
  }
  return `http://127.0.0.1:${(cairn.server.address() as AddressInfo).port}`;
}

/** Opens a socket.io client to a base URL with an access token (no reconnection, so refusals show at once). */
export function openSocket(
  baseUrl: string,
  token: string | undefined,
  options: Partial<ManagerOptions & SocketOptions> = {},
): ClientSocket {
  return ioClient(baseUrl, {
    auth: token === undefined ? {} : { token },
    transports: ['websocket'],
    reconnection: false,
    forceNew: true,
    timeout: 5000,
    ...options,
  });
}

/**
 * Creates a facilitator account through the admin API and signs it in: a "stranger" with no role
 * on the demo workshop.
 */
export async function createStranger(t: TestApp, label = 'stranger'): Promise<TestAccount> {
  const adminToken = await t.tokenFor('admin');
  const email = `${label}-${crypto.randomUUID().slice(0, 8)}@harbourlane.example`;
  const password = 'a stranger password';
  const res = await t.agent
    .post('/api/users')
    .set('Authorization', `Bearer ${adminToken}`)
    .send({ email, name: 'Robin Stranger', role: 'facilitator', password });
  if (res.status !== 201) throw new Error(`creating ${email} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return { id: res.body.id as string, email, password, token: await t.signIn(email, password) };
}

/** Gives an account a per-workshop role directly in the database (quicker than the invitation round trip). */
export async function addMember(t: TestApp, workshopId: string, userId: string, role: 'cofacilitator' | 'observer'): Promise<void> {
  await t.cairn.ctx.db.models.Membership.create({ id: crypto.randomUUID(), workshopId, userId, role });
}

/** The seeded demo workshop's id and its agenda item ids, in order. */
export async function demoWorkshop(t: TestApp): Promise<{ id: string; itemIds: string[] }> {
  const { Workshop, AgendaItem } = t.cairn.ctx.db.models;
  const w = await Workshop.findOne({ where: { title: DEMO_WORKSHOP_TITLE } });
  if (!w) throw new Error('the demo workshop is not seeded');
  const items = await AgendaItem.findAll({ where: { workshopId: w.id }, order: [['position', 'ASC']] });
  return { id: w.id, itemIds: items.map((i) => i.id) };
}

/** The demo account's id. */
export async function demoUserId(t: TestApp, role: DemoRole): Promise<string> {
  const u = await t.cairn.ctx.db.models.User.findOne({ where: { email: DEMO_ACCOUNTS[role].email } });
  if (!u) throw new Error(`the demo ${role} is not seeded`);
  return u.id;
}

/** An `Authorization` header value for a token. */
export function bearer(token: string): string {
  return `Bearer ${token}`;
}

/** What a socket command's acknowledgement carries on success. */
export type CommandData<E extends keyof ClientToServerEvents> =
  Parameters<ClientToServerEvents[E]>[1] extends AckFn<infer T> ? T : never;

/**
 * Sends a socket command and waits (up to 3 s) for its acknowledgement; the payload is untyped on
 * purpose, so tests can send what a misbehaving client would.
 */
export function command<E extends keyof ClientToServerEvents>(
  socket: ClientSocket,
  event: E,
  payload: unknown = {},
): Promise<Ack<CommandData<E>>> {
  const untyped = socket.timeout(3000) as unknown as { emitWithAck(ev: string, p: unknown): Promise<Ack<CommandData<E>>> };
  return untyped.emitWithAck(event, payload);
}

/** The data of a command's acknowledgement; fails the test with the error when it was refused. */
export async function commandData<E extends keyof ClientToServerEvents>(
  socket: ClientSocket,
  event: E,
  payload: unknown = {},
): Promise<CommandData<E>> {
  const answer = await command(socket, event, payload);
  if ('error' in answer) throw new Error(`${event} was refused: ${answer.error.code} ${answer.error.message}`);
  return answer.data;
}

/** The next broadcast of an event that passes `accept`, or a rejection after `timeoutMs`. */
export function nextEvent<E extends keyof ServerToClientEvents>(
  socket: ClientSocket,
  event: E,
  accept: (payload: Parameters<ServerToClientEvents[E]>[0]) => boolean = () => true,
  timeoutMs = 1000,
): Promise<Parameters<ServerToClientEvents[E]>[0]> {
  type Payload = Parameters<ServerToClientEvents[E]>[0];
  const untyped = socket as unknown as { on(ev: string, fn: (p: Payload) => void): void; off(ev: string, fn: (p: Payload) => void): void };
  return new Promise((resolve, reject) => {
    const timer = setTimeout(() => {
      untyped.off(event, listener);
      reject(new Error(`no ${event} within ${timeoutMs} ms`));
    }, timeoutMs);
    const listener = (payload: Payload) => {
      if (!accept(payload)) return;
      clearTimeout(timer);
      untyped.off(event, listener);
      resolve(payload);
    };
    untyped.on(event, listener);
  });
}

/** A random device id as a phone keeps one. */
export function newDeviceId(): string {
  return `device-${crypto.randomUUID()}`;
}

/** Starts (or reopens) the live session of a workshop as the holder of a token (a rehearsal or the day; the day when not said). */
export async function startLive(t: TestApp, token: string, workshopId: string, kind?: 'rehearsal' | 'day'): Promise<LiveSessionInfo> {
  const res = await t.agent
    .post(`/api/workshops/${workshopId}/live`)
    .set('Authorization', bearer(token))
    .send(kind ? { kind } : {});
  if (res.status !== 201 && res.status !== 200) throw new Error(`starting live answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body as LiveSessionInfo;
}

/** Joins a live session from a phone (a new device unless one is given). */
export async function joinLive(
  t: TestApp,
  code: string,
  who: { displayName: string; photoConsent?: boolean; deviceId?: string },
): Promise<JoinAnswer> {
  const res = await t.agent
    .post(`/api/join/${code}`)
    .send({ displayName: who.displayName, photoConsent: who.photoConsent ?? true, deviceId: who.deviceId ?? newDeviceId() });
  if (res.status !== 200) throw new Error(`joining ${code} answered ${res.status}: ${JSON.stringify(res.body)}`);
  return res.body as JoinAnswer;
}

/** One note a phone sends during {@link liveDay}: to the first agenda item of `type`, from phone number `phone` (0-based). */
export interface LiveDayNote {
  type: import('../../shared/schemas/agenda-item').ActivityType;
  phone: number;
  text: string;
  kind?: import('../../shared/schemas/live').SubmissionInput['kind'];
  part?: string;
  /** Structured fields; a function gets the ids of the teams by name (e.g. the team whose prototype was tested). */
  fields?: Record<string, string> | ((teamIds: Map<string, string>) => Record<string, string>);
}

/** What {@link liveDay} made: the workshop, its session, the owner's token and socket, and the phones. */
export interface LiveDay {
  workshopId: string;
  sessionId: string;
  agenda: import('../../shared/schemas/agenda-item').AgendaItem[];
  ownerToken: string;
  owner: ClientSocket;
  phones: { answer: JoinAnswer; socket: ClientSocket }[];
}

/**
 * Runs a short live day on a fresh workshop of the demo facilitator (from a template, with the demo
 * observer as its observer): phones join, teams are set, the facilitator goes to each activity in
 * turn and the phones send their notes; the session is stopped at the end unless `stop` is false.
 * @example const day = await liveDay(t, { phones: [{ displayName: 'Ana' }], notes: [{ type: 'insights', phone: 0, text: 'Hi' }] });
 */
export async function liveDay(
  t: TestApp,
  spec: {
    title?: string;
    template?: 'full-day' | 'half-day';
    phones: { displayName: string; photoConsent?: boolean }[];
    teams?: { name: string; challenge: string | null; phones: number[] }[];
    notes: LiveDayNote[];
    stop?: boolean;
  },
): Promise<LiveDay> {
  const ownerToken = await t.tokenFor('facilitator');
  const made = await t.agent
    .post('/api/workshops')
    .set('Authorization', bearer(ownerToken))
    .send({
      title: spec.title ?? 'Harbour Lane: a first ride',
      objective: "Improve a new member's first ride",
      date: '2027-03-13',
      headcount: 18,
      templateId: spec.template ?? 'full-day',
    });
  if (made.status !== 201) throw new Error(`creating the workshop answered ${made.status}: ${JSON.stringify(made.body)}`);
  const workshopId = made.body.id as string;
  const agenda = made.body.agenda as LiveDay['agenda'];
  await addMember(t, workshopId, await demoUserId(t, 'observer'), 'observer');
  const info = await startLive(t, ownerToken, workshopId);
  const owner = await t.connect(ownerToken);
  await commandData(owner, 'session:watch', { sessionId: info.sessionId });
  const phones: LiveDay['phones'] = [];
  for (const p of spec.phones) {
    const answer = await joinLive(t, info.joinCode, p);
    phones.push({ answer, socket: await t.connect(answer.token) });
  }
  const teamIds = new Map<string, string>();
  if (spec.teams) {
    const teams = await commandData(owner, 'teams:set', {
      teams: spec.teams.map((team) => ({ name: team.name, challenge: team.challenge, memberIds: team.phones.map((i) => phones[i]!.answer.me.id) })),
    });
    for (const team of teams) teamIds.set(team.name, team.id);
  }
  let at = -1;
  for (const [n, note] of spec.notes.entries()) {
    const index = agenda.findIndex((i) => i.type === note.type);
    if (index < 0) throw new Error(`the agenda has no ${note.type}`);
    if (index !== at) {
      await commandData(owner, 'session:goto', { index });
      at = index;
    }
    await commandData(phones[note.phone]!.socket, 'submission:create', {
      clientId: `live-day-note-${n}-${crypto.randomUUID()}`,
      itemId: agenda[index]!.id,
      kind: note.kind ?? 'note',
      text: note.text,
      ...(note.part ? { part: note.part } : {}),
      ...(note.fields ? { fields: typeof note.fields === 'function' ? note.fields(teamIds) : note.fields } : {}),
    });
  }
  if (spec.stop !== false) {
    const res = await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(ownerToken));
    if (res.status !== 200) throw new Error(`stopping the session answered ${res.status}: ${JSON.stringify(res.body)}`);
  }
  return { workshopId, sessionId: info.sessionId, agenda, ownerToken, owner, phones };
}
