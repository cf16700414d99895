import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import type { LiveSessionInfo } from '../../shared/schemas/live';
import { command, commandData, demoWorkshop, joinLive, newDeviceId, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let info: LiveSessionInfo;
let facilitator: ClientSocket;
let phone: ClientSocket;
let insightsId: string;

beforeAll(async () => {
  t = await startTestApp();
  const demo = await demoWorkshop(t);
  const owner = await t.tokenFor('facilitator');
  info = await startLive(t, owner, demo.id);
  facilitator = await t.connect(owner);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  phone = await t.connect((await joinLive(t, info.joinCode, { displayName: 'Ines Moreau' })).token);
  const items = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId: demo.id }, order: [['position', 'ASC']] });
  const index = items.findIndex((i) => i.type === 'insights');
  insightsId = items[index]!.id;
  await commandData(facilitator, 'session:goto', { index });
});
afterAll(() => t.close());

/** Zero-width space, zero-width joiner, byte order mark, word joiner and a Hangul filler: nothing that shows. */
const INVISIBLE = '\u200B\u200D\uFEFF\u2060\u3164';

describe('text made only of invisible characters', () => {
  it('is refused as a display name, with a clear message', async () => {
    const res = await t.agent.post(`/api/join/${info.joinCode}`).send({ displayName: INVISIBLE, photoConsent: true, deviceId: newDeviceId() });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toEqual({ displayName: expect.stringMatching(/only invisible characters/) });
  });

  it('is refused as a note and as a theme name', async () => {
    const note = await command(phone, 'submission:create', { clientId: 'invisible-note-1', itemId: insightsId, kind: 'note', text: INVISIBLE });
    expect(note).toMatchObject({ error: { code: 'validation_failed', message: expect.stringMatching(/text: .*only invisible characters/), params: { field: 'text' } } });
    const theme = await command(facilitator, 'themes:create', { itemId: insightsId, name: `${INVISIBLE} \u00A0`, noteIds: [] });
    expect(theme).toMatchObject({ error: { code: 'validation_failed', message: expect.stringMatching(/name: .*only invisible characters/), params: { field: 'name' } } });
  });
});

describe('names with control characters and bidi overrides', () => {
  it('are stored without them, in NFC', async () => {
    const joined = await joinLive(t, info.joinCode, { displayName: '\u202ENoor\u202C Hadda\u0064\u0007 Ine\u0301s' });
    expect(joined.me.displayName).toBe('Noor Haddad In\u00e9s');
    const row = await t.cairn.ctx.db.models.Participant.findByPk(joined.me.id);
    expect(row!.displayName).toBe('Noor Haddad In\u00e9s');
  });
});
