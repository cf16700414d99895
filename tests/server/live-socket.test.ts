import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ClockSync, remainingMs, serverNow } from '../../shared/clock';
import type { LiveSessionInfo, LiveState, ParticipantView, ScreenState, SubmissionView } from '../../shared/schemas/live';
import {
  addMember,
  command,
  commandData,
  createStranger,
  demoWorkshop,
  joinLive,
  newDeviceId,
  nextEvent,
  startLive,
  startTestApp,
  type ClientSocket,
  type TestApp,
} from './helpers';

let t: TestApp;
let demo: { id: string; itemIds: string[] };
let info: LiveSessionInfo;
let facilitator: ClientSocket;
let observer: ClientSocket;
let phoneA: ClientSocket;
let phoneB: ClientSocket;
let tokenA: string;
let participantA: string;
let participantB: string;

beforeAll(async () => {
  t = await startTestApp();
  demo = await demoWorkshop(t);
  const owner = await t.tokenFor('facilitator');
  info = await startLive(t, owner, demo.id);
  const a = await joinLive(t, info.joinCode, { displayName: 'Ines Moreau', photoConsent: true, deviceId: newDeviceId() });
  const b = await joinLive(t, info.joinCode, { displayName: 'Kofi Mensah', photoConsent: false, deviceId: newDeviceId() });
  tokenA = a.token;
  participantA = a.me.id;
  participantB = b.me.id;
  facilitator = await t.connect(owner);
  observer = await t.connect(await t.tokenFor('observer'));
  phoneA = await t.connect(a.token);
  phoneB = await t.connect(b.token);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  await commandData(observer, 'session:watch', { sessionId: info.sessionId });
});
afterAll(() => t.close());

/** The facilitator moves to an item and every test starts from a known place. */
async function goto(index: number): Promise<LiveState> {
  return commandData(facilitator, 'session:goto', { index });
}

/** The events of one kind a socket receives during `ms`. */
async function collect<T>(socket: ClientSocket, event: 'submission:created' | 'participants:updated', ms: number): Promise<T[]> {
  const seen: T[] = [];
  const listener = (payload: T) => seen.push(payload);
  const untyped = socket as unknown as { on(e: string, f: (p: T) => void): void; off(e: string, f: (p: T) => void): void };
  untyped.on(event, listener);
  await new Promise((r) => setTimeout(r, ms));
  untyped.off(event, listener);
  return seen;
}

describe('moving through the agenda', () => {
  it('reaches both phones with the next item within a second of the facilitator pressing next', async () => {
    const before = await goto(0);
    const onA = nextEvent(phoneA, 'session:updated', (s) => s.currentIndex === 1, 1000);
    const onB = nextEvent(phoneB, 'session:updated', (s) => s.currentIndex === 1, 1000);
    const answer = await commandData(facilitator, 'session:next');
    const [a, b] = await Promise.all([onA, onB]);
    for (const s of [answer, a, b]) {
      expect(s.item?.id).toBe(demo.itemIds[1]);
      expect(s.currentIndex).toBe(1);
      expect(s.version).toBe(before.version + 1);
      expect(s.timer).toEqual({ status: 'idle', endsAt: null, remainingMs: null, durationMs: s.item!.timeboxMin * 60_000 });
      expect(s.revealed).toBe(false);
    }
    // The previous item's run is closed and the new one is open.
    const runs = answer.runs.slice(-2);
    expect(runs[0]).toMatchObject({ itemId: demo.itemIds[0], endedAt: expect.any(Number) });
    expect(runs[1]).toMatchObject({ itemId: demo.itemIds[1], endedAt: null });
    expect(runs[1]!.startedAt).toBe(runs[0]!.endedAt);
  });

  it('pushes the phones a phone state that does not grow with the day, and the console the whole state', async () => {
    await goto(0);
    const sizes: number[] = [];
    for (const index of [1, 2, 1, 2, 1, 2]) {
      const onPhone = nextEvent(phoneA, 'session:updated', (s) => s.currentIndex === index, 1000);
      const onConsole = nextEvent(facilitator, 'session:updated', (s) => s.currentIndex === index, 1000);
      await goto(index);
      const [phone, screen] = await Promise.all([onPhone, onConsole]);
      expect(phone.runs).toBeUndefined();
      expect(phone.participantCount).toBeUndefined();
      expect(phone.item?.id).toBe(demo.itemIds[index]);
      expect(screen.runs?.length).toBeGreaterThan(0);
      sizes.push(JSON.stringify(phone).length);
    }
    // The same item weighs the same after four more moves: only the version's and the clock's digits may differ.
    expect(Math.abs(sizes[5]! - sizes[1]!)).toBeLessThanOrEqual(4);
    const synced = await commandData(phoneA, 'session:sync');
    expect(synced.runs).toBeUndefined();
    expect(synced.currentIndex).toBe(2);
  });

  it('goes back, and refuses to go before the first or past the last item', async () => {
    await goto(1);
    expect((await commandData(facilitator, 'session:back')).currentIndex).toBe(0);
    expect(await command(facilitator, 'session:back')).toEqual({ error: { code: 'conflict', message: expect.any(String), reason: 'first_item' } });
    const last = demo.itemIds.length - 1;
    expect((await goto(last)).item?.id).toBe(demo.itemIds[last]);
    expect(await command(facilitator, 'session:next')).toEqual({ error: { code: 'conflict', message: expect.any(String), reason: 'last_item' } });
    expect(await command(facilitator, 'session:goto', { index: demo.itemIds.length })).toMatchObject({ error: { code: 'bad_request' } });
  });

  it('keeps the state in SQLite before broadcasting it', async () => {
    const s = await goto(2);
    const row = await t.cairn.ctx.db.models.LiveSession.findByPk(info.sessionId);
    expect(row?.currentIndex).toBe(2);
    expect(row?.version).toBe(s.version);
    expect(row?.timer).toEqual(s.timer);
  });
});

describe('who may run the session', () => {
  it('refuses run commands from a participant with forbidden', async () => {
    for (const [event, payload] of [
      ['session:next', {}],
      ['session:reveal', { revealed: true }],
      ['timer:start', {}],
      ['session:lock', { locked: true }],
      ['participants:list', {}],
      ['session:watch', { sessionId: info.sessionId }],
    ] as const) {
      const answer = await command(phoneA, event, payload);
      expect(answer, event).toEqual({ error: { code: 'forbidden', message: expect.any(String) } });
    }
    expect((await commandData(phoneA, 'session:sync')).timer.status).toBe('idle');
  });

  it('lets an observer watch and follow the state, but not advance', async () => {
    const watched = await commandData(observer, 'session:watch', { sessionId: info.sessionId });
    expect(watched.sessionId).toBe(info.sessionId);
    for (const [event, payload] of [
      ['session:next', {}],
      ['timer:start', {}],
      ['session:message', { text: 'Hello' }],
      ['participants:list', {}],
    ] as const) {
      expect(await command(observer, event, payload), event).toEqual({ error: { code: 'forbidden', message: expect.any(String), reason: 'runners_only' } });
    }
    const followed = nextEvent(observer, 'session:updated', (s) => s.currentIndex === 3);
    await goto(3);
    expect((await followed).item?.id).toBe(demo.itemIds[3]);
    expect((await commandData(observer, 'session:sync')).currentIndex).toBe(3);
  });

  it('refuses to let an account with no role watch, and answers not_found for an unknown session', async () => {
    const stranger = await createStranger(t, 'live-socket-stranger');
    const socket = await t.connect(stranger.token);
    expect(await command(socket, 'session:watch', { sessionId: info.sessionId })).toEqual({ error: { code: 'forbidden', message: expect.any(String), reason: 'no_role' } });
    expect(await command(socket, 'session:sync')).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(socket, 'session:next')).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(facilitator, 'session:watch', { sessionId: 'no-such-session' })).toMatchObject({ error: { code: 'not_found' } });
    socket.disconnect();
  });

  it('lets a co-facilitator run the session', async () => {
    const co = await createStranger(t, 'live-socket-co');
    await addMember(t, demo.id, co.id, 'cofacilitator');
    const socket = await t.connect(co.token);
    await commandData(socket, 'session:watch', { sessionId: info.sessionId });
    expect((await commandData(socket, 'session:goto', { index: 4 })).currentIndex).toBe(4);
    socket.disconnect();
  });

  it('stops a co-facilitator at the next command once removed from the workshop, and an account once disabled', async () => {
    const removed = await createStranger(t, 'live-socket-removed');
    const disabled = await createStranger(t, 'live-socket-disabled');
    const sockets: ClientSocket[] = [];
    for (const account of [removed, disabled]) {
      await addMember(t, demo.id, account.id, 'cofacilitator');
      const socket = await t.connect(account.token);
      await commandData(socket, 'session:watch', { sessionId: info.sessionId });
      expect((await commandData(socket, 'session:goto', { index: 4 })).currentIndex).toBe(4);
      sockets.push(socket);
    }
    const { Membership, User } = t.cairn.ctx.db.models;
    const told = sockets.map((socket) => nextEvent(socket, 'access:revoked'));
    const closed = new Promise((resolve) => sockets[1]!.once('disconnect', resolve));
    await Membership.destroy({ where: { workshopId: demo.id, userId: removed.id } });
    await User.update({ disabled: true }, { where: { id: disabled.id } });
    // Both are told at once; the removed co-facilitator's next command is refused, the disabled account's socket is closed.
    expect(await told[0]).toMatchObject({ reason: 'removed' });
    expect(await told[1]).toMatchObject({ reason: 'disabled' });
    await closed;
    const answer = await command(sockets[0]!, 'session:goto', { index: 3 });
    expect('error' in answer && answer.error.code).toBe('forbidden');
    sockets[0]!.disconnect();
  });

  it('lets the projector follow with its display token, read-only', async () => {
    const display = new URL(info.displayUrl).searchParams.get('display')!;
    const projector = await t.connect(display);
    expect((await commandData(projector, 'session:sync')).sessionId).toBe(info.sessionId);
    const followed = nextEvent(projector, 'session:updated', (s) => s.currentIndex === 5);
    await goto(5);
    expect((await followed).item?.id).toBe(demo.itemIds[5]);
    for (const event of ['session:next', 'timer:start', 'participant:me', 'participants:list'] as const) {
      expect(await command(projector, event), event).toMatchObject({ error: { code: 'forbidden' } });
    }
    expect('data' in (await command(projector, 'clock:ping', { t1: 1 }))).toBe(true);
    projector.disconnect();
  });
});

describe('payload validation', () => {
  it.each([
    ['session:goto', { index: 'two' }],
    ['session:goto', { index: -1 }],
    ['session:goto', { index: 1.5 }],
    ['timer:adjust', { deltaMs: '60000' }],
    ['timer:adjust', { deltaMs: 10_000_000 }],
    ['session:message', { text: '   ' }],
    ['session:lock', {}],
    ['session:reveal', { revealed: 'yes' }],
    ['session:next', { extra: true }],
    ['agenda:shorten', { cuts: [{ itemId: 'x', toMin: 0 }] }],
    ['submission:list', {}],
    ['session:watch', { sessionId: '' }],
    ['session:sync', 'now'],
  ] as const)('answers %s with %j by validation_failed', async (event, payload) => {
    const answer = await command(facilitator, event, payload);
    // The reason names the first rejected field for the screens to word; the English message is for logs.
    expect(answer).toMatchObject({ error: { code: 'validation_failed', message: expect.any(String), reason: 'payload_invalid', params: { field: expect.any(String) } } });
  });

  it.each([
    ['an empty note', { clientId: 'validation-1', itemId: 'x', kind: 'note', text: '  ' }],
    ['an unknown kind', { clientId: 'validation-2', itemId: 'x', kind: 'poem', text: 'Hi' }],
    ['a short clientId', { clientId: 'x', itemId: 'x', kind: 'note', text: 'Hi' }],
    ['no object at all', 'Dock was full'],
  ])('answers a submission with %s by validation_failed', async (_name, payload) => {
    expect(await command(phoneA, 'submission:create', payload)).toMatchObject({ error: { code: 'validation_failed', message: expect.any(String), reason: 'payload_invalid' } });
  });

  it('names the field in the message', async () => {
    const answer = await command(phoneA, 'submission:create', { clientId: 'validation-3', itemId: 'x', kind: 'note', text: '' });
    expect(answer).toMatchObject({ error: { message: 'text: Write something first' } });
  });

  it('names the field as a reason with its path, and its problem as a code, for the phone to word', async () => {
    const answer = await command(phoneA, 'submission:create', { clientId: 'validation-4', itemId: 'x', kind: 'note', text: 'x'.repeat(501) });
    expect(answer).toEqual({
      error: {
        code: 'validation_failed',
        message: expect.stringContaining('text: '),
        reason: 'payload_invalid',
        params: { field: 'text' },
        fieldIssues: { text: { code: 'too_big', params: { max: 500, of: 'string' } } },
      },
    });
  });
});

describe('the shared countdown', () => {
  it('starts, pauses, resumes and adjusts with the right timer state', async () => {
    const idle = await goto(2);
    const timebox = idle.item!.timeboxMin * 60_000;
    expect(idle.timer).toEqual({ status: 'idle', endsAt: null, remainingMs: null, durationMs: timebox });

    // Pausing a timer that never started makes no sense.
    expect(await command(facilitator, 'timer:pause')).toMatchObject({ error: { code: 'conflict' } });

    const longer = await commandData(facilitator, 'timer:adjust', { deltaMs: 60_000 });
    expect(longer.timer).toEqual({ status: 'idle', endsAt: null, remainingMs: null, durationMs: timebox + 60_000 });

    let before = Date.now();
    const started = await commandData(facilitator, 'timer:start');
    let after = Date.now();
    expect(started.timer.status).toBe('running');
    expect(started.timer.endsAt!).toBeGreaterThanOrEqual(before + timebox + 60_000);
    expect(started.timer.endsAt!).toBeLessThanOrEqual(after + timebox + 60_000);
    // Starting again does not restart a running timer.
    expect((await commandData(facilitator, 'timer:start')).timer).toEqual(started.timer);

    await new Promise((r) => setTimeout(r, 30));
    before = Date.now();
    const paused = await commandData(facilitator, 'timer:pause');
    after = Date.now();
    expect(paused.timer.status).toBe('paused');
    expect(paused.timer.endsAt).toBeNull();
    expect(paused.timer.remainingMs!).toBeLessThanOrEqual(started.timer.endsAt! - before);
    expect(paused.timer.remainingMs!).toBeGreaterThanOrEqual(started.timer.endsAt! - after);

    const shorter = await commandData(facilitator, 'timer:adjust', { deltaMs: -60_000 });
    expect(shorter.timer).toMatchObject({ status: 'paused', remainingMs: paused.timer.remainingMs! - 60_000 });

    before = Date.now();
    const resumed = await commandData(facilitator, 'timer:resume');
    after = Date.now();
    expect(resumed.timer.status).toBe('running');
    expect(resumed.timer.endsAt!).toBeGreaterThanOrEqual(before + shorter.timer.remainingMs!);
    expect(resumed.timer.endsAt!).toBeLessThanOrEqual(after + shorter.timer.remainingMs!);

    const plus = await commandData(facilitator, 'timer:adjust', { deltaMs: 60_000 });
    expect(plus.timer.endsAt).toBe(resumed.timer.endsAt! + 60_000);

    // Never below zero: taking away an hour leaves a timer that has run out, not a negative one.
    const drained = await commandData(facilitator, 'timer:adjust', { deltaMs: -3_600_000 });
    expect(drained.timer.status).toBe('running');
    expect(remainingMs(drained.timer, drained.serverTime)).toBe(0);
    // An overrun timer given a minute has a minute again.
    before = Date.now();
    const extra = await commandData(facilitator, 'timer:adjust', { deltaMs: 60_000 });
    expect(extra.timer.endsAt!).toBeGreaterThanOrEqual(before + 60_000);
  });

  it('moving to another item resets the timer to that item’s idle timebox', async () => {
    await commandData(facilitator, 'timer:start');
    const moved = await goto(3);
    expect(moved.timer).toEqual({ status: 'idle', endsAt: null, remainingMs: null, durationMs: moved.item!.timeboxMin * 60_000 });
  });

  it('shows the same remaining time on a phone whose clock is an hour off (RFC 5905 §8 offset and delay)', async () => {
    await goto(2);
    await commandData(facilitator, 'timer:start');
    const phoneClock = () => Date.now() + 3_600_000;
    const sync = new ClockSync();
    for (let i = 0; i < 8; i++) {
      const t1 = phoneClock();
      const pong = await commandData(phoneA, 'clock:ping', { t1 });
      sync.addRoundTrip(pong.t1, pong.t2, pong.t3, phoneClock());
    }
    const best = sync.best!;
    // θ estimates server − phone = −1 h, within δ/2 (RFC 5905 §8).
    expect(Math.abs(sync.offsetMs + 3_600_000)).toBeLessThanOrEqual(best.delay / 2);

    const state = await commandData(phoneA, 'session:sync');
    expect(state.timer.status).toBe('running');
    const now = Date.now();
    const onPhone = remainingMs(state.timer, serverNow(now + 3_600_000, sync.offsetMs));
    const onServer = remainingMs(state.timer, now);
    expect(onServer).toBeGreaterThan(60_000);
    expect(Math.abs(onPhone - onServer)).toBeLessThanOrEqual(best.delay);
  });

  it('locks, reveals and messages every phone', async () => {
    await goto(5);
    const messaged = nextEvent(phoneB, 'session:messaged');
    const withMessage = nextEvent(phoneB, 'session:updated', (s) => s.message?.text === 'Back in five minutes, please');
    await commandData(facilitator, 'session:message', { text: '  Back in five minutes, please ' });
    expect(await messaged).toEqual({ id: expect.any(String), text: 'Back in five minutes, please', sentAt: expect.any(Number) });
    expect((await withMessage).message?.id).toBe((await messaged).id);

    const revealed = nextEvent(phoneA, 'session:updated', (s) => s.revealed);
    expect((await commandData(facilitator, 'session:reveal', { revealed: true })).revealed).toBe(true);
    await revealed;
    expect((await commandData(facilitator, 'session:reveal', { revealed: false })).revealed).toBe(false);
  });
});

describe("the projector's language", () => {
  it('is set by a runner for the session, kept in SQLite, and reaches the projector at once and after a reload', async () => {
    const display = new URL(info.displayUrl).searchParams.get('display')!;
    const projector = await t.connect(display);
    expect((await commandData(projector, 'session:sync')).projectorLocale).toBe('en');
    const followed = nextEvent(projector, 'session:updated', (s) => s.projectorLocale === 'de');
    expect((await commandData(facilitator, 'session:projector-locale', { locale: 'de' })).projectorLocale).toBe('de');
    await followed;
    const row = await t.cairn.ctx.db.models.LiveSession.findByPk(info.sessionId);
    expect(row?.projectorLocale).toBe('de');
    // A projector that reloads asks again and gets the session's language.
    projector.disconnect();
    const reloaded = await t.connect(display);
    expect((await commandData(reloaded, 'session:sync')).projectorLocale).toBe('de');
    expect((await commandData(facilitator, 'session:projector-locale', { locale: 'en' })).projectorLocale).toBe('en');
    reloaded.disconnect();
  });

  it('refuses an observer, a phone and the projector itself, and a language Cairn does not speak', async () => {
    const display = new URL(info.displayUrl).searchParams.get('display')!;
    const projector = await t.connect(display);
    for (const socket of [observer, phoneA, projector]) {
      expect(await command(socket, 'session:projector-locale', { locale: 'de' })).toMatchObject({ error: { code: 'forbidden' } });
    }
    for (const payload of [{ locale: 'fr' }, { locale: 'DE' }, {}, { locale: 'de', extra: 1 }, 'de']) {
      expect(await command(facilitator, 'session:projector-locale', payload), JSON.stringify(payload)).toMatchObject({ error: { code: 'validation_failed' } });
    }
    expect((await commandData(facilitator, 'session:sync')).projectorLocale).toBe('en');
    projector.disconnect();
  });
});

describe('shortening the rest of the agenda', () => {
  it('cuts later items, never below their shortest timebox, and leaves the current timer alone', async () => {
    const at = await goto(9);
    const running = await commandData(facilitator, 'timer:start');
    const items = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId: demo.id }, order: [['position', 'ASC']] });
    const sketch = items[11]!;
    const storyboard = items[13]!;
    const shortened = await commandData(facilitator, 'agenda:shorten', {
      cuts: [
        { itemId: sketch.id, toMin: sketch.timeboxMin - 5 },
        { itemId: storyboard.id, toMin: 1 },
      ],
    });
    expect(shortened.timer).toEqual(running.timer);
    expect(shortened.currentIndex).toBe(at.currentIndex);
    expect(shortened.version).toBe(running.version + 1);
    // The live run's timeboxes change; the stored plan does not.
    expect(shortened.timeboxes).toEqual({ [sketch.id]: 15, [storyboard.id]: storyboard.minTimeboxMin });
    expect(shortened.canUndoCuts).toBe(true);
    await sketch.reload();
    await storyboard.reload();
    expect(sketch.timeboxMin).toBe(20);
    expect(storyboard.timeboxMin).toBeGreaterThan(storyboard.minTimeboxMin);

    // Undo gives the run its timeboxes back; a second undo has nothing to undo.
    const undone = await commandData(facilitator, 'agenda:undo-cuts');
    expect(undone.timeboxes).toEqual({});
    expect(undone.canUndoCuts).toBe(false);
    expect(await command(facilitator, 'agenda:undo-cuts')).toMatchObject({ error: { code: 'conflict' } });

    // Writing the cuts into the plan is its own choice.
    await commandData(facilitator, 'agenda:shorten', { cuts: [{ itemId: sketch.id, toMin: 15 }] });
    const kept = await commandData(facilitator, 'agenda:keep-cuts');
    expect(kept.timeboxes).toEqual({});
    await sketch.reload();
    expect(sketch.timeboxMin).toBe(15);

    // The current item and earlier ones are not for cutting.
    for (const index of [9, 2]) {
      expect(await command(facilitator, 'agenda:shorten', { cuts: [{ itemId: items[index]!.id, toMin: 5 }] })).toMatchObject({
        error: { code: 'bad_request' },
      });
    }
  });
});

describe('who is in the room', () => {
  it('lists the participants with who is online, and tells a phone who it is', async () => {
    const list = await commandData(facilitator, 'participants:list');
    expect(list.map((p) => p.displayName)).toEqual(['Ines Moreau', 'Kofi Mensah']);
    expect(list.every((p) => p.online)).toBe(true);
    expect(await commandData(phoneB, 'participant:me')).toEqual({ id: participantB, displayName: 'Kofi Mensah', photoConsent: false, teamId: null });
    const state = await commandData(facilitator, 'session:sync');
    expect(state.participantCount).toBe(2);
    expect(state.onlineCount).toBe(2);
  });

  it('brings a participant’s consent change to the facilitator', async () => {
    const updated = nextEvent(facilitator, 'participants:updated', (list) => list.some((p) => p.id === participantA && !p.photoConsent));
    const me = await commandData(phoneA, 'participant:consent', { photoConsent: false });
    expect(me).toMatchObject({ id: participantA, photoConsent: false });
    expect((await updated).find((p) => p.id === participantA)?.photoConsent).toBe(false);
    expect((await t.cairn.ctx.db.models.Participant.findByPk(participantA))?.photoConsent).toBe(false);
    await commandData(phoneA, 'participant:consent', { photoConsent: true });
  });

  it('resyncs a phone that lost its connection while the facilitator moved on', async () => {
    await goto(5);
    const offline = nextEvent(facilitator, 'participants:updated', (list) => list.some((p) => p.id === participantA && !p.online));
    phoneA.disconnect();
    expect((await offline).find((p) => p.id === participantB)?.online).toBe(true);
    expect((await commandData(facilitator, 'session:sync')).onlineCount).toBe(1);

    const missed: ScreenState[] = [];
    phoneA.on('session:updated', (s) => missed.push(s));
    const moved = await commandData(facilitator, 'session:next');
    expect(moved.currentIndex).toBe(6);

    const online = nextEvent(facilitator, 'participants:updated', (list) => list.find((p) => p.id === participantA)?.online === true);
    phoneA.connect();
    await new Promise<void>((resolve) => phoneA.once('connect', () => resolve()));
    const synced = await commandData(phoneA, 'session:sync');
    expect(synced.currentIndex).toBe(6);
    expect(synced.item?.id).toBe(demo.itemIds[6]);
    expect(synced.version).toBe(moved.version);
    // The phone missed the broadcast while it was away; the sync is what brought it back.
    expect(missed.filter((s) => s.currentIndex === 6)).toHaveLength(0);
    await online;
    phoneA.off('session:updated');

    // Back in the session's room: it hears the next change.
    const heard = nextEvent(phoneA, 'session:updated', (s) => s.currentIndex === 7);
    await commandData(facilitator, 'session:next');
    expect((await heard).item?.id).toBe(demo.itemIds[7]);
  });

  it('counts a participant online while any of their sockets is connected', async () => {
    const second = await t.connect(tokenA);
    await commandData(second, 'session:sync');
    second.disconnect();
    // Give the server time to see the disconnect and announce the room.
    await new Promise((r) => setTimeout(r, 400));
    const list: ParticipantView[] = await commandData(facilitator, 'participants:list');
    expect(list.find((p) => p.id === participantA)?.online).toBe(true);
  });
});

describe('submissions', () => {
  it('stores a submission retried three times with the same clientId exactly once', async () => {
    const state = await goto(5);
    const itemId = state.item!.id;
    const created = collect<SubmissionView>(facilitator, 'submission:created', 600);
    const payload = { clientId: 'retry-note-0001', itemId, kind: 'note', text: 'The dock app never said which dock had space' };
    const answers = [];
    for (let i = 0; i < 3; i++) answers.push(await commandData(phoneA, 'submission:create', payload));
    expect(answers[0]!.duplicate).toBe(false);
    expect(answers.slice(1)).toEqual([
      { id: answers[0]!.id, duplicate: true },
      { id: answers[0]!.id, duplicate: true },
    ]);
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { participantId: participantA, clientId: 'retry-note-0001' } })).toBe(1);
    const seen = await created;
    expect(seen).toHaveLength(1);
    expect(seen[0]).toMatchObject({ id: answers[0]!.id, displayName: 'Ines Moreau', itemId, kind: 'note', hidden: false, part: null });

    // The same clientId from another participant is another submission.
    const other = await commandData(phoneB, 'submission:create', payload);
    expect(other.duplicate).toBe(false);
    expect(other.id).not.toBe(answers[0]!.id);
  });

  it('stores the same submission once even when the retries race each other', async () => {
    const state = await commandData(facilitator, 'session:sync');
    const payload = { clientId: 'racing-note-0001', itemId: state.item!.id, kind: 'note', text: 'Seat height was a puzzle' };
    const answers = await Promise.all([1, 2, 3].map(() => commandData(phoneB, 'submission:create', payload)));
    expect(new Set(answers.map((a) => a.id)).size).toBe(1);
    expect(answers.filter((a) => !a.duplicate)).toHaveLength(1);
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { participantId: participantB, clientId: 'racing-note-0001' } })).toBe(1);
  });

  it('refuses submissions while input is locked, and to an item that is not current', async () => {
    const state = await commandData(facilitator, 'session:sync');
    const itemId = state.item!.id;
    const locked = nextEvent(phoneA, 'session:updated', (s) => s.locked);
    await commandData(facilitator, 'session:lock', { locked: true });
    expect((await locked).locked).toBe(true);
    const refused = await command(phoneA, 'submission:create', { clientId: 'locked-note-0001', itemId, kind: 'note', text: 'Locked out' });
    expect(refused).toEqual({ error: { code: 'input_locked', message: expect.any(String) } });
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { clientId: 'locked-note-0001' } })).toBe(0);

    await commandData(facilitator, 'session:lock', { locked: false });
    const accepted = await command(phoneA, 'submission:create', { clientId: 'locked-note-0001', itemId, kind: 'note', text: 'Let in' });
    expect(accepted).toMatchObject({ data: { duplicate: false } });

    const stale = await command(phoneA, 'submission:create', { clientId: 'stale-note-0001', itemId: demo.itemIds[0], kind: 'note', text: 'Late' });
    expect(stale).toMatchObject({ error: { code: 'conflict' } });
  });

  it('lists the submissions of an item for the facilitator, with guided-sentence fields', async () => {
    // The demo's point-of-view activity (a guided sentence is what it takes).
    const state = await goto(6);
    const itemId = state.item!.id;
    await commandData(phoneB, 'submission:create', {
      clientId: 'pov-0001',
      itemId,
      kind: 'point_of_view',
      text: 'A new member needs to find a free dock because a full dock ends the first ride badly',
      fields: { user: 'A new member', need: 'to find a free dock', insight: 'a full dock ends the first ride badly' },
    });
    const list = await commandData(facilitator, 'submission:list', { itemId });
    expect(list.map((s) => s.text)).toContain('A new member needs to find a free dock because a full dock ends the first ride badly');
    const pov = list.find((s) => s.kind === 'point_of_view')!;
    expect(pov).toMatchObject({ displayName: 'Kofi Mensah', participantId: participantB, fields: { user: 'A new member' } });
    expect(list.map((s) => s.createdAt)).toEqual([...list.map((s) => s.createdAt)].sort((a, b) => a - b));
    expect(await command(phoneA, 'submission:list', { itemId })).toMatchObject({ error: { code: 'forbidden' } });
  });
});

describe('a phone joining while the console and the projector watch', () => {
  it('tells the facilitator who joined and came online, and the projector the new head count, without a new version', async () => {
    const display = new URL(info.displayUrl).searchParams.get('display')!;
    const projector = await t.connect(display);
    const before = await commandData(projector, 'session:sync');

    const joined = nextEvent(facilitator, 'participants:updated', (list) => list.some((p) => p.displayName === 'Lena Brandt'));
    const counted = nextEvent(projector, 'session:updated', (s) => s.participantCount === (before.participantCount ?? 0) + 1);
    const lena = await joinLive(t, info.joinCode, { displayName: 'Lena Brandt', photoConsent: true });
    expect((await joined).find((p) => p.id === lena.me.id)).toMatchObject({ online: false, photoConsent: true, teamId: null });
    const heads = await counted;
    expect(heads.version).toBe(before.version);
    expect(heads.onlineCount).toBe(before.onlineCount);

    const online = nextEvent(facilitator, 'participants:updated', (list) => list.find((p) => p.id === lena.me.id)?.online === true);
    const onlineCounted = nextEvent(projector, 'session:updated', (s) => s.onlineCount === (before.onlineCount ?? 0) + 1);
    const phone = await t.connect(lena.token);
    await online;
    await onlineCounted;
    phone.disconnect();
    projector.disconnect();
  });
});
