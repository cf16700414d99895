import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { ACTIVITY_LIBRARY } from '../../shared/activities';
import { ActivityType } from '../../shared/schemas/agenda-item';
import type { LiveSessionInfo } from '../../shared/schemas/live';
import { command, commandData, demoWorkshop, joinLive, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';

let t: TestApp;
let info: LiveSessionInfo;
let facilitator: ClientSocket;
let phone: ClientSocket;
let types: string[];

beforeAll(async () => {
  t = await startTestApp();
  const demo = await demoWorkshop(t);
  const owner = await t.tokenFor('facilitator');
  info = await startLive(t, owner, demo.id);
  facilitator = await t.connect(owner);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  phone = await t.connect((await joinLive(t, info.joinCode, { displayName: 'Ines Moreau' })).token);
  const items = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId: demo.id }, order: [['position', 'ASC']] });
  types = items.map((i) => i.type);
});
afterAll(() => t.close());

let n = 0;
/** Sends a plain note of a kind to the current item. */
async function send(itemId: string, extra: Record<string, unknown> = {}) {
  n += 1;
  return command(phone, 'submission:create', { clientId: `bounds-note-${n}`, itemId, kind: 'note', text: 'The dock was full', ...extra });
}

describe('notes on an item that takes none', () => {
  it('are refused on a talk, a break, a lunch and a vote, and nothing is stored', async () => {
    // Pinned by hand: a talk, a break or lunch takes no notes; a vote takes dots, not notes.
    for (const type of ['welcome', 'break', 'lunch', 'dot_vote', 'team_sort'] as const) {
      expect(ACTIVITY_LIBRARY[type].noteKinds).toEqual([]);
      const state = await commandData(facilitator, 'session:goto', { index: types.indexOf(type) });
      for (const kind of ['note', 'reflection', 'feedback', 'frame', 'point_of_view'] as const) {
        const answer = await send(state.item!.id, { kind });
        expect(answer).toEqual({ error: { code: 'bad_request', message: 'This activity takes no notes', reason: 'note_not_taken' } });
      }
    }
    expect(await t.cairn.ctx.db.models.Submission.count({ where: { sessionId: info.sessionId } })).toBe(0);
  });

  it('takes only its own kinds elsewhere, derived from the activity library', async () => {
    for (const type of ActivityType.options) expect(Array.isArray(ACTIVITY_LIBRARY[type].noteKinds)).toBe(true);
    const state = await commandData(facilitator, 'session:goto', { index: types.indexOf('insights') });
    expect(await send(state.item!.id, { kind: 'reflection' })).toEqual({ error: { code: 'bad_request', message: 'This activity takes other kinds of notes', reason: 'note_other_kind' } });
    expect(await send(state.item!.id)).toMatchObject({ data: { duplicate: false } });
  });
});

describe('the fields of a note', () => {
  it('are bounded in number, whatever the activity', async () => {
    const state = await commandData(facilitator, 'session:goto', { index: types.indexOf('insights') });
    const fields = Object.fromEntries(Array.from({ length: 9 }, (_, i) => [`f${i}`, 'x'.repeat(300)]));
    const answer = await send(state.item!.id, { fields });
    expect(answer).toMatchObject({ error: { code: 'validation_failed', message: 'fields: A note carries at most 8 fields', reason: 'payload_invalid', params: { field: 'fields' } } });
    const many = Object.fromEntries(Array.from({ length: 500 }, (_, i) => [`f${i}`, 'x'.repeat(300)]));
    expect(await send(state.item!.id, { fields: many })).toMatchObject({ error: { code: 'validation_failed' } });
  });
});
