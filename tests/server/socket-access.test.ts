import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { COMMANDS, type Command, type CommandAccess } from '../../shared/events';
import type { LiveSessionInfo } from '../../shared/schemas/live';
import {
  addMember,
  bearer,
  command,
  commandData,
  createStranger,
  demoWorkshop,
  joinLive,
  nextEvent,
  startLive,
  startTestApp,
  type ClientSocket,
  type TestAccount,
  type TestApp,
} from './helpers';
import { SOCKETS_PER_PARTICIPANT, PHONE_EVENT_BUDGET } from '../../server/common/socket-rate-limit';

let t: TestApp;
let demo: { id: string; itemIds: string[] };
let info: LiveSessionInfo;
let ownerToken: string;
let owner: ClientSocket;

beforeAll(async () => {
  t = await startTestApp();
  demo = await demoWorkshop(t);
  ownerToken = await t.tokenFor('facilitator');
  info = await startLive(t, ownerToken, demo.id);
  owner = await t.connect(ownerToken);
  await commandData(owner, 'session:watch', { sessionId: info.sessionId });
});
afterAll(() => t.close());

/** A co-facilitator of the demo workshop with an open console watching the session. */
async function coFacilitatorConsole(label: string): Promise<{ account: TestAccount; socket: ClientSocket; membershipId: string }> {
  const account = await createStranger(t, label);
  await addMember(t, demo.id, account.id, 'cofacilitator');
  const membership = await t.cairn.ctx.db.models.Membership.findOne({ where: { workshopId: demo.id, userId: account.id } });
  const socket = await t.connect(account.token);
  await commandData(socket, 'session:watch', { sessionId: info.sessionId });
  return { account, socket, membershipId: membership!.id };
}

/** Whether a socket receives a new note's `submission:created` broadcast within a short wait. */
async function hearsNewNote(socket: ClientSocket, phone: ClientSocket, text: string): Promise<boolean> {
  const state = await commandData(owner, 'session:goto', { index: demo.itemIds.length > 5 ? 5 : 0 });
  const heard = nextEvent(socket, 'submission:created', (s) => s.text === text, 700).then(
    () => true,
    () => false,
  );
  await commandData(phone, 'submission:create', { clientId: `heard-${crypto.randomUUID()}`, itemId: state.item!.id, kind: 'note', text });
  return heard;
}

/** Resolves when the socket is closed by the server. */
function closedByServer(socket: ClientSocket): Promise<string> {
  return new Promise((resolve) => socket.once('disconnect', (reason) => resolve(reason)));
}

describe('a co-facilitator whose rights are taken away (issue 14, items 4 and 5)', () => {
  it('once removed from the workshop, is told why, leaves the facilitators’ rooms at once and is refused after', async () => {
    const phone = await t.connect((await joinLive(t, info.joinCode, { displayName: 'Ines Moreau' })).token);
    const { socket, membershipId } = await coFacilitatorConsole('removed');
    expect(await hearsNewNote(socket, phone, 'Seat height was a puzzle')).toBe(true);
    const told = nextEvent(socket, 'access:revoked');
    const res = await t.agent.delete(`/api/workshops/${demo.id}/members/${membershipId}`).set('Authorization', bearer(ownerToken));
    expect(res.status).toBe(204);
    expect(await told).toEqual({ reason: 'removed', message: expect.stringMatching(/no longer have a role/) });
    // No more facilitator-only broadcasts (new notes carry their authors' names)…
    expect(await hearsNewNote(socket, phone, 'The dock app never said which dock was free')).toBe(false);
    // …and no command.
    for (const event of ['session:next', 'participants:list', 'session:sync'] as const) {
      expect(await command(socket, event), event).toMatchObject({ error: { code: 'forbidden' } });
    }
  });

  it('once disabled by an admin, is told why and disconnected at once', async () => {
    const { account, socket } = await coFacilitatorConsole('disabled');
    const told = nextEvent(socket, 'access:revoked');
    const closed = closedByServer(socket);
    const res = await t.agent.patch(`/api/users/${account.id}`).set('Authorization', bearer(await t.tokenFor('admin'))).send({ disabled: true });
    expect(res.status).toBe(200);
    expect(await told).toMatchObject({ reason: 'disabled' });
    expect(await closed).toBe('io server disconnect');
  });

  it('once the password is changed elsewhere, is told why and disconnected at once', async () => {
    const { account, socket } = await coFacilitatorConsole('password');
    const elsewhere = await t.signIn(account.email, account.password);
    const told = nextEvent(socket, 'access:revoked', () => true, 5000);
    const closed = closedByServer(socket);
    const res = await t.agent
      .post('/api/auth/password')
      .set('Authorization', bearer(elsewhere))
      .send({ currentPassword: account.password, newPassword: 'a brand new password for the co-op' });
    expect(res.status).toBe(200);
    expect(await told).toMatchObject({ reason: 'signed_out' });
    expect(await closed).toBe('io server disconnect');
  });

  it('after "sign out everywhere", an open console can no longer run the session', async () => {
    const { account, socket } = await coFacilitatorConsole('sign-out');
    const browser = supertest.agent(t.cairn.express);
    expect((await browser.post('/api/auth/sign-in').send({ email: account.email, password: account.password })).status).toBe(200);
    const told = nextEvent(socket, 'access:revoked');
    const closed = closedByServer(socket);
    expect((await browser.post('/api/auth/sign-out')).status).toBe(204);
    expect(await told).toMatchObject({ reason: 'signed_out' });
    await closed;
  });

  it('rechecks the token version on each command even when nobody told this process (a change made elsewhere)', async () => {
    const { account, socket } = await coFacilitatorConsole('elsewhere');
    // Written straight to the file, as another Cairn process sharing it would: no hook runs here.
    await t.cairn.ctx.db.sequelize.query('UPDATE users SET tokenVersion = tokenVersion + 1 WHERE id = ?', { replacements: [account.id] });
    const told = nextEvent(socket, 'access:revoked');
    const answer = await command(socket, 'session:message', { text: 'Everyone to the dock, please' });
    expect(answer).toMatchObject({ error: { code: 'forbidden' } });
    expect(await told).toMatchObject({ reason: 'signed_out' });
  });
});

describe('the sockets of one participant (issue 14, item 11)', () => {
  it(`are bounded to ${SOCKETS_PER_PARTICIPANT}: a new one closes the oldest`, async () => {
    const joined = await joinLive(t, info.joinCode, { displayName: 'Kofi Mensah' });
    const sockets: ClientSocket[] = [];
    for (let i = 0; i < SOCKETS_PER_PARTICIPANT + 3; i++) sockets.push(await t.connect(joined.token));
    await new Promise((r) => setTimeout(r, 200));
    expect(sockets.filter((s) => s.connected)).toHaveLength(SOCKETS_PER_PARTICIPANT);
    expect(sockets.slice(0, 3).every((s) => !s.connected)).toBe(true);
    expect(await command(sockets.at(-1)!, 'participant:me')).toMatchObject({ data: { id: joined.me.id } });
  });

  it('share one event budget, so more sockets do not buy more events', async () => {
    const joined = await joinLive(t, info.joinCode, { displayName: 'Lena Brandt' });
    const sockets: ClientSocket[] = [];
    for (let i = 0; i < SOCKETS_PER_PARTICIPANT; i++) sockets.push(await t.connect(joined.token));
    const answers = await Promise.all(sockets.flatMap((s) => Array.from({ length: PHONE_EVENT_BUDGET.burst }, () => command(s, 'participant:me'))));
    const served = answers.filter((a) => 'data' in a).length;
    // One burst for all of them (plus what refills while they are sent), not one burst each.
    expect(served).toBeGreaterThanOrEqual(PHONE_EVENT_BUDGET.burst);
    expect(served).toBeLessThan(PHONE_EVENT_BUDGET.burst * 2);
    expect(answers.filter((a) => 'error' in a && a.error.code === 'rate_limited').length).toBe(answers.length - served);
  });
});

/** The kinds of socket the matrix walks. */
type Kind = 'phone' | 'projector' | 'observer' | 'runner' | 'revoked';
const KINDS: Kind[] = ['phone', 'projector', 'observer', 'runner', 'revoked'];

/** Which kinds each access declaration lets through: the rule the matrix expects. */
const ALLOWS: Record<CommandAccess, Kind[]> = {
  any: ['phone', 'projector', 'observer', 'runner', 'revoked'],
  account: ['observer', 'runner'],
  screen: ['phone', 'projector', 'observer', 'runner'],
  display: ['projector', 'observer', 'runner'],
  participant: ['phone'],
  runner: ['runner'],
};

/** A few commands' access written out by hand, so a change to the table itself shows here too. */
const PINNED: Partial<Record<Command, Kind[]>> = {
  'session:next': ['runner'],
  'session:message': ['runner'],
  'participants:list': ['runner'],
  'submission:list': ['runner'],
  'submission:create': ['phone'],
  'vote:dot': ['phone'],
  'session:sync': ['phone', 'projector', 'observer', 'runner'],
  'activity:board': ['phone', 'projector', 'observer', 'runner'],
  'storyboard:arrange': ['runner'],
  'pages:show': ['projector', 'observer', 'runner'],
  'pages:turn': ['runner'],
  'clock:ping': ['phone', 'projector', 'observer', 'runner', 'revoked'],
};

describe('every socket command from every kind of socket', () => {
  const sockets = {} as Record<Kind, ClientSocket>;

  beforeAll(async () => {
    const joined = await joinLive(t, info.joinCode, { displayName: 'Noor Haddad' });
    sockets.phone = await t.connect(joined.token);
    sockets.projector = await t.connect(new URL(info.displayUrl).searchParams.get('display')!);
    sockets.observer = await t.connect(await t.tokenFor('observer'));
    await commandData(sockets.observer, 'session:watch', { sessionId: info.sessionId });
    sockets.runner = (await coFacilitatorConsole('matrix-runner')).socket;
    const revoked = await coFacilitatorConsole('matrix-revoked');
    const told = nextEvent(revoked.socket, 'access:revoked');
    await t.agent.delete(`/api/workshops/${demo.id}/members/${revoked.membershipId}`).set('Authorization', bearer(ownerToken));
    await told;
    sockets.revoked = revoked.socket;
  });

  it('pins a handful of commands by hand, in agreement with the declared table', () => {
    for (const [event, kinds] of Object.entries(PINNED)) expect(ALLOWS[COMMANDS[event as Command].access], event).toEqual(kinds);
  });

  it('serves every declared command, as the registry lists itself', () => {
    const listed = t.cairn.commands.list();
    expect(listed.map((c) => c.event)).toEqual(Object.keys(COMMANDS));
    expect(listed.filter((c) => !c.handled)).toEqual([]);
  });

  it('answers each command from each kind as its declaration says: refused with forbidden, or let through', async () => {
    const commands = Object.keys(COMMANDS) as Command[];
    expect(commands.length).toBeGreaterThan(40);
    const seen: string[] = [];
    for (const event of commands) {
      // A payload that passes validation only where it matters for authorisation: watching needs a session.
      const payload = event === 'session:watch' ? { sessionId: info.sessionId } : event === 'clock:ping' ? { t1: Date.now() } : {};
      // Results are the room's once revealed (before that only the facilitators', a rule of the vote, not of access).
      if (event === 'vote:results') await commandData(owner, 'session:reveal', { revealed: true });
      for (const kind of KINDS) {
        let answer = await command(sockets[kind], event, payload);
        // The phone's event budget is the phone's; wait for it rather than count it as a refusal.
        while ('error' in answer && answer.error.code === 'rate_limited') {
          await new Promise((r) => setTimeout(r, 200));
          answer = await command(sockets[kind], event, payload);
        }
        const refused = 'error' in answer && (answer.error.code === 'forbidden' || answer.error.code === 'unauthenticated');
        const allowed = ALLOWS[COMMANDS[event].access].includes(kind);
        seen.push(`${event} × ${kind}: ${refused ? 'refused' : 'let through'}`);
        expect(refused, `${event} from ${kind}: ${JSON.stringify(answer)}`).toBe(!allowed);
      }
    }
    expect(seen).toHaveLength(commands.length * KINDS.length);
  }, 60_000);
});
