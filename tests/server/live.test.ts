import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import jsQR from 'jsqr';
import { PNG } from 'pngjs';
import type supertest from 'supertest';
import { DEMO_WORKSHOP_TITLE } from '../../server/db/seed';
import { DEFAULT_CONSENT_TEXT } from '../../shared/schemas/workshop';
import { JOIN_CODE_ALPHABET, JOIN_CODE_LENGTH, JoinAnswer, JoinInfo, LiveSessionInfo } from '../../shared/schemas/live';
import {
  addMember,
  bearer,
  command,
  commandData,
  createStranger,
  demoWorkshop,
  joinLive,
  newDeviceId,
  nextEvent,
  startLive,
  startTestApp,
  type TestAccount,
  type TestApp,
} from './helpers';

let t: TestApp;
let owner: string;
let observer: string;
let admin: string;
let cofacilitator: TestAccount;
let stranger: TestAccount;
let demo: { id: string; itemIds: string[] };

beforeAll(async () => {
  t = await startTestApp();
  owner = await t.tokenFor('facilitator');
  observer = await t.tokenFor('observer');
  admin = await t.tokenFor('admin');
  demo = await demoWorkshop(t);
  stranger = await createStranger(t, 'live-stranger');
  cofacilitator = await createStranger(t, 'live-cofacilitator');
  await addMember(t, demo.id, cofacilitator.id, 'cofacilitator');
});
afterAll(() => t.close());

/** A code in the right format that no session has. */
function unusedCode(taken: string): string {
  const code = JOIN_CODE_ALPHABET.slice(0, JOIN_CODE_LENGTH);
  return code === taken ? JOIN_CODE_ALPHABET.slice(1, JOIN_CODE_LENGTH + 1) : code;
}

/** A fresh full-day workshop owned by the demo facilitator. */
async function freshWorkshop(title: string): Promise<string> {
  const res = await t.agent
    .post('/api/workshops')
    .set('Authorization', bearer(owner))
    .send({ title, objective: 'Try a live session end to end', date: '2027-03-20', headcount: 18, templateId: 'full-day' });
  expect(res.status).toBe(201);
  return res.body.id as string;
}

/** Decodes a PNG QR code with an independent reader (jsQR) and returns its text. */
function decodeQr(png: Buffer): string | null {
  const image = PNG.sync.read(png);
  const pixels = new Uint8ClampedArray(image.data.buffer, image.data.byteOffset, image.data.length);
  return jsQR(pixels, image.width, image.height)?.data ?? null;
}

/** Supertest's binary body parser, so the PNG arrives as a Buffer. */
function binary(res: supertest.Response, done: (err: Error | null, body: Buffer) => void): void {
  const chunks: Buffer[] = [];
  res.on('data', (c: Buffer) => chunks.push(c));
  res.on('end', () => done(null, Buffer.concat(chunks)));
}

describe('starting a live session', () => {
  let info: LiveSessionInfo;

  it('refuses the signed out (401), a stranger (403) and an observer (403)', async () => {
    const url = `/api/workshops/${demo.id}/live`;
    const signedOut = await t.agent.post(url);
    expect(signedOut.status).toBe(401);
    expect(signedOut.body.error.code).toBe('unauthenticated');
    for (const token of [stranger.token, observer]) {
      const res = await t.agent.post(url).set('Authorization', bearer(token));
      expect(res.status).toBe(403);
      expect(res.body.error.code).toBe('forbidden');
    }
    // None of them started one.
    expect((await t.agent.get(url).set('Authorization', bearer(owner))).body).toBeNull();
  });

  it('starts one for the owner (201) with a join link, a projector link and a join code of the right alphabet', async () => {
    const res = await t.agent.post(`/api/workshops/${demo.id}/live`).set('Authorization', bearer(owner));
    expect(res.status).toBe(201);
    info = LiveSessionInfo.parse(res.body);
    expect(info.status).toBe('live');
    expect(info.joinCode).toHaveLength(JOIN_CODE_LENGTH);
    for (const ch of info.joinCode) expect(JOIN_CODE_ALPHABET).toContain(ch);
    expect(info.joinUrl).toMatch(new RegExp(`^https?://[^/]+/join/${info.joinCode}$`));
    expect(info.displayUrl).toMatch(new RegExp(`^https?://[^/]+/projector/${info.sessionId}\\?display=[\\w-]+\\.[\\w-]+\\.[\\w-]+$`));
    const displayToken = new URL(info.displayUrl).searchParams.get('display')!;
    expect(t.cairn.ctx.tokens.verify(displayToken)).toMatchObject({ ok: true, claims: { kind: 'display', sid: info.sessionId } });
  });

  it('returns the same session when started again (200), also to a co-facilitator', async () => {
    for (const token of [owner, cofacilitator.token]) {
      const res = await t.agent.post(`/api/workshops/${demo.id}/live`).set('Authorization', bearer(token));
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ sessionId: info.sessionId, joinCode: info.joinCode, status: 'live' });
    }
    expect(await t.cairn.ctx.db.models.LiveSession.count({ where: { workshopId: demo.id } })).toBe(1);
  });

  it('lets every reading role see the live session', async () => {
    for (const token of [owner, cofacilitator.token, observer, admin]) {
      const res = await t.agent.get(`/api/workshops/${demo.id}/live`).set('Authorization', bearer(token));
      expect(res.status).toBe(200);
      expect(res.body).toMatchObject({ sessionId: info.sessionId, joinCode: info.joinCode });
    }
    expect((await t.agent.get(`/api/workshops/${demo.id}/live`).set('Authorization', bearer(stranger.token))).status).toBe(403);
  });

  it('draws different codes for different sessions', async () => {
    const other = await startLive(t, owner, await freshWorkshop('Second workshop for codes'));
    expect(other.sessionId).not.toBe(info.sessionId);
    expect(other.joinCode).not.toBe(info.joinCode);
  });
});

describe('joining from a phone', () => {
  let info: LiveSessionInfo;
  beforeAll(async () => {
    info = await startLive(t, owner, demo.id);
  });

  it('tells a phone the workshop title and the data policy for a live code', async () => {
    const res = await t.agent.get(`/api/join/${info.joinCode}`);
    expect(res.status).toBe(200);
    expect(JoinInfo.parse(res.body)).toEqual({ sessionId: info.sessionId, workshopTitle: DEMO_WORKSHOP_TITLE, consentText: DEFAULT_CONSENT_TEXT, retentionDays: null });
  });

  it('forgives case, spaces and dashes in a typed code', async () => {
    const typed = `${info.joinCode.slice(0, 3).toLowerCase()} -${info.joinCode.slice(3).toLowerCase()}`;
    const res = await t.agent.get(`/api/join/${encodeURIComponent(typed)}`);
    expect(res.status).toBe(200);
    expect(res.body.sessionId).toBe(info.sessionId);
  });

  it('answers 404 with a clear message for an unknown code, and 400 for a code that cannot be one', async () => {
    const res = await t.agent.get(`/api/join/${unusedCode(info.joinCode)}`).set('X-Cairn-Device', newDeviceId());
    expect(res.status).toBe(404);
    expect(res.body.error).toMatchObject({ code: 'not_found', message: expect.stringMatching(/no live session has the code/i) });
    const malformed = await t.agent.get('/api/join/0OIL1').set('X-Cairn-Device', newDeviceId());
    expect(malformed.status).toBe(400);
    expect(malformed.body.error.code).toBe('validation_failed');
  });

  it('refuses bad bodies with 400 and the fields to fix', async () => {
    const deviceId = newDeviceId();
    const emptyName = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: '   ', photoConsent: true, deviceId });
    expect(emptyName.status).toBe(400);
    expect(emptyName.body.error.code).toBe('validation_failed');
    expect(emptyName.body.error.fields).toEqual({ displayName: 'Enter a name the room will know you by' });

    const noConsent = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Noor', deviceId });
    expect(noConsent.status).toBe(400);
    expect(noConsent.body.error.fields).toEqual({ photoConsent: 'Choose whether photos of you may be shown' });

    const noDevice = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Noor', photoConsent: false });
    expect(noDevice.status).toBe(400);
    expect(Object.keys(noDevice.body.error.fields)).toEqual(['deviceId']);
  });

  it('gives a participant token, and the same participant to the same phone joining again', async () => {
    const deviceId = newDeviceId();
    const first = JoinAnswer.parse(await joinLive(t, info.joinCode, { displayName: ' Noor Haddad ', photoConsent: true, deviceId }));
    expect(first.sessionId).toBe(info.sessionId);
    expect(first.me).toEqual({ id: first.me.id, displayName: 'Noor Haddad', photoConsent: true, teamId: null });
    expect(t.cairn.ctx.tokens.verify(first.token)).toMatchObject({
      ok: true,
      claims: { kind: 'participant', sub: first.me.id, sid: info.sessionId },
    });

    // The phone reloads and joins again, now without photo consent.
    const again = await joinLive(t, info.joinCode, { displayName: 'Noor H.', photoConsent: false, deviceId });
    expect(again.me).toEqual({ id: first.me.id, displayName: 'Noor H.', photoConsent: false, teamId: null });
    expect(await t.cairn.ctx.db.models.Participant.count({ where: { sessionId: info.sessionId, deviceId } })).toBe(1);

    const otherPhone = await joinLive(t, info.joinCode, { displayName: 'Noor Haddad' });
    expect(otherPhone.me.id).not.toBe(first.me.id);
  });

  it('gives a phone that joins again its team and its language back, and counts it once', async () => {
    const deviceId = newDeviceId();
    const join = (body: object) => t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Tomasz', photoConsent: true, deviceId, ...body });
    const first = await join({ locale: 'de' });
    expect(first.status).toBe(200);
    const id = first.body.me.id as string;
    // The head count the console shows, as a facilitator's socket reads it.
    const console_ = await t.connect(owner);
    const headCount = async () => (await commandData(console_, 'session:watch', { sessionId: info.sessionId })).participantCount;
    const participantCount = await headCount();
    expect(participantCount).toBe(await t.cairn.ctx.db.models.Participant.count({ where: { sessionId: info.sessionId } }));
    await t.cairn.ctx.db.models.Participant.update({ teamId: 'team-harbour' }, { where: { id } });
    const row = () => t.cairn.ctx.db.models.Participant.findByPk(id);

    // A reload that does not say its language keeps the one it had, and the team it was put in.
    const again = await join({ displayName: 'Tomasz W.' });
    expect(again.body.me).toEqual({ id, displayName: 'Tomasz W.', photoConsent: true, teamId: 'team-harbour' });
    expect(await row()).toMatchObject({ displayName: 'Tomasz W.', locale: 'de', teamId: 'team-harbour' });
    // One that says it takes it.
    expect((await join({ locale: 'es', photoConsent: false })).body.me).toMatchObject({ id, photoConsent: false });
    expect(await row()).toMatchObject({ locale: 'es', photoConsent: false });
    expect(await headCount()).toBe(participantCount);
    expect(await t.cairn.ctx.db.models.Participant.count({ where: { sessionId: info.sessionId } })).toBe(participantCount);
    console_.disconnect();
  });

  it('rate-limits code guessing from one phone (429) while another phone still joins', async () => {
    const guesser = newDeviceId();
    const wrong = unusedCode(info.joinCode);
    // 20 failed lookups per device per 10 minutes: by body and by header alike.
    for (let i = 0; i < 10; i++) {
      const res = await t.agent.post(`/api/join/${wrong}`).send({ displayName: 'Guess', photoConsent: false, deviceId: guesser });
      expect(res.status).toBe(404);
    }
    for (let i = 0; i < 10; i++) {
      expect((await t.agent.get(`/api/join/${wrong}`).set('X-Cairn-Device', guesser)).status).toBe(404);
    }
    const blocked = await t.agent.post(`/api/join/${wrong}`).send({ displayName: 'Guess', photoConsent: false, deviceId: guesser });
    expect(blocked.status).toBe(429);
    expect(blocked.body.error).toEqual({ code: 'rate_limited', reason: 'join_tries_phone', message: expect.stringMatching(/too many tries from this phone/i) });
    // The guesser is held back even with the right code now…
    expect((await t.agent.get(`/api/join/${info.joinCode}`).set('X-Cairn-Device', guesser)).status).toBe(429);
    // …while the rest of the room, behind the same address, joins as usual.
    const neighbour = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Ines', photoConsent: true, deviceId: newDeviceId() });
    expect(neighbour.status).toBe(200);
  });

  it('does not count successful joins against a phone', async () => {
    const deviceId = newDeviceId();
    for (let i = 0; i < 25; i++) {
      const res = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Kofi', photoConsent: true, deviceId });
      expect(res.status).toBe(200);
    }
  });
});

describe('joins per code', () => {
  it('takes up to JOINS_PER_CODE joins of one code in the window, then asks the next phone to wait', async () => {
    const small = await startTestApp({ JOINS_PER_CODE: '12' });
    try {
      const room = await startLive(small, await small.tokenFor('facilitator'), (await demoWorkshop(small)).id);
      for (let i = 0; i < 12; i++) {
        const res = await small.agent.post(`/api/join/${room.joinCode}`).send({ displayName: `Rider ${i + 1}`, photoConsent: true, deviceId: newDeviceId() });
        expect(res.status).toBe(200);
      }
      const late = await small.agent.post(`/api/join/${room.joinCode}`).send({ displayName: 'Rider 13', photoConsent: true, deviceId: newDeviceId() });
      expect(late.status).toBe(429);
      expect(late.body.error).toEqual({ code: 'rate_limited', reason: 'join_crowded', message: expect.stringMatching(/too many people are joining/i) });
    } finally {
      await small.close();
    }
  });
});

describe('the join QR code', () => {
  let info: LiveSessionInfo;
  beforeAll(async () => {
    info = await startLive(t, owner, demo.id);
  });

  it('decodes to exactly the join link (ISO/IEC 18004 QR, read back by the independent jsQR decoder)', async () => {
    const res = await t.agent.get(`/api/workshops/${demo.id}/live/qr.png`).set('Authorization', bearer(owner)).buffer(true).parse(binary);
    expect(res.status).toBe(200);
    expect(res.headers['content-type']).toBe('image/png');
    const png = res.body as Buffer;
    // PNG signature, RFC 2083 §3.1.
    expect([...png.subarray(0, 8)]).toEqual([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]);
    expect(PNG.sync.read(png).width).toBeGreaterThanOrEqual(500);
    // ISO/IEC 18004 (QR Code): read back by jsQR, a decoder written independently of the qrcode encoder.
    expect(decodeQr(png)).toBe(info.joinUrl);
  });

  it('is shown to every reading role, to the projector with its display token, and to nobody else', async () => {
    const url = `/api/workshops/${demo.id}/live/qr.png`;
    for (const token of [cofacilitator.token, observer, admin]) {
      expect((await t.agent.get(url).set('Authorization', bearer(token))).status).toBe(200);
    }
    expect((await t.agent.get(url).set('Authorization', bearer(stranger.token))).status).toBe(403);
    expect((await t.agent.get(url)).status).toBe(401);

    const display = new URL(info.displayUrl).searchParams.get('display')!;
    const byQuery = await t.agent.get(`${url}?display=${display}`).buffer(true).parse(binary);
    expect(byQuery.status).toBe(200);
    expect(decodeQr(byQuery.body as Buffer)).toBe(info.joinUrl);
    expect((await t.agent.get(url).set('Authorization', bearer(display))).status).toBe(200);

    // A projector of another workshop's session cannot read this one's code.
    const other = await startLive(t, owner, await freshWorkshop('Other workshop for the QR check'));
    const otherDisplay = new URL(other.displayUrl).searchParams.get('display')!;
    const refused = await t.agent.get(`${url}?display=${otherDisplay}`);
    expect(refused.status).toBe(403);
    expect(refused.body.error.code).toBe('forbidden');
  });

  it('answers 404 when the workshop has no live session', async () => {
    const id = await freshWorkshop('Workshop without a live session');
    const res = await t.agent.get(`/api/workshops/${id}/live/qr.png`).set('Authorization', bearer(owner));
    expect(res.status).toBe(404);
    expect(res.body.error.code).toBe('not_found');
  });
});

describe('stopping a live session', () => {
  it('ends input, closes the code, keeps what was submitted, and a new start gets a new session', async () => {
    const workshopId = await freshWorkshop('Workshop to stop');
    const info = await startLive(t, owner, workshopId);
    const phone = await joinLive(t, info.joinCode, { displayName: 'Ada', photoConsent: true });
    const socket = await t.connect(phone.token);
    // The first activity that takes plain notes.
    const runner = await t.connect(owner);
    await commandData(runner, 'session:watch', { sessionId: info.sessionId });
    const agenda = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId }, order: [['position', 'ASC']] });
    await commandData(runner, 'session:goto', { index: agenda.findIndex((i) => i.type === 'insights') });
    const state = await command(socket, 'session:sync');
    if (!('data' in state)) throw new Error('sync was refused');
    const itemId = state.data.item!.id;
    const stored = await command(socket, 'submission:create', { clientId: 'before-stop-1', itemId, kind: 'note', text: 'Dock was full' });
    expect(stored).toMatchObject({ data: { duplicate: false } });

    // Only those who run the workshop may stop it.
    expect((await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(observer))).status).toBe(403);
    expect((await t.agent.post(`/api/workshops/${workshopId}/live/stop`)).status).toBe(401);

    const ended = nextEvent(socket, 'session:ended');
    const finalState = nextEvent(socket, 'session:updated', (s) => s.status === 'ended');
    const res = await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(owner));
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ sessionId: info.sessionId, status: 'ended' });
    expect((await ended).reason).toMatch(/ended/);
    const last = await finalState;
    expect(last.timer.status).toBe('ended');
    // A phone's state carries no runs; the stored session has closed every one.
    expect(last.runs).toBeUndefined();
    const row = await t.cairn.ctx.db.models.LiveSession.findByPk(info.sessionId);
    expect(row!.runs.every((r) => r.endedAt !== null)).toBe(true);

    const refused = await command(socket, 'submission:create', { clientId: 'after-stop-1', itemId, kind: 'note', text: 'Too late' });
    expect(refused).toEqual({ error: { code: 'session_ended', message: expect.any(String) } });
    // A retry of what was stored before the end still finds it.
    expect(await command(socket, 'submission:create', { clientId: 'before-stop-1', itemId, kind: 'note', text: 'Dock was full' })).toEqual({
      data: { id: (stored as { data: { id: string } }).data.id, duplicate: true },
    });

    const info404 = await t.agent.get(`/api/join/${info.joinCode}`).set('X-Cairn-Device', newDeviceId());
    expect(info404.status).toBe(404);
    expect(info404.body.error.message).toMatch(/ended/);
    const late = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: 'Late', photoConsent: true, deviceId: newDeviceId() });
    expect(late.status).toBe(404);
    expect(late.body.error).toMatchObject({ code: 'not_found', reason: 'join_ended' });
    expect((await t.agent.get(`/api/workshops/${workshopId}/live`).set('Authorization', bearer(owner))).body).toBeNull();
    expect((await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(owner))).status).toBe(404);

    // The workshop keeps everything.
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { sessionId: info.sessionId } })).toBe(1);
    expect(await t.cairn.ctx.db.models.Participant.count({ where: { sessionId: info.sessionId } })).toBe(1);

    const restarted = await t.agent.post(`/api/workshops/${workshopId}/live`).set('Authorization', bearer(owner));
    expect(restarted.status).toBe(201);
    expect(restarted.body.sessionId).not.toBe(info.sessionId);
    expect(restarted.body.joinCode).not.toBe(info.joinCode);
  });
});
