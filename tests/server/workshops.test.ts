import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import { DEMO_WORKSHOP_TITLE } from '../../server/db/seed';
import { TEMPLATES } from '../../shared/templates';
import type { AgendaItem } from '../../shared/schemas/agenda-item';
import { addMember, bearer, createStranger, demoUserId, demoWorkshop, startTestApp, type TestAccount, type TestApp } from './helpers';

let t: TestApp;
let owner: string;
let observer: string;
let admin: string;
let stranger: TestAccount;
let cofacilitator: TestAccount;
let demoId: string;

beforeAll(async () => {
  t = await startTestApp();
  [owner, observer, admin] = await Promise.all([t.tokenFor('facilitator'), t.tokenFor('observer'), t.tokenFor('admin')]);
  stranger = await createStranger(t, 'stranger');
  cofacilitator = await createStranger(t, 'cofacilitator');
  demoId = (await demoWorkshop(t)).id;
  await addMember(t, demoId, cofacilitator.id, 'cofacilitator');
});
afterAll(() => t.close());

const brief = (over: Record<string, unknown> = {}) => ({
  title: 'Docking without the fuss',
  objective: 'Learn why new members struggle to dock a bike at the harbour station.',
  date: '2027-05-08',
  headcount: 12,
  ...over,
});

function as(token: string) {
  return {
    get: (url: string) => t.agent.get(url).set('Authorization', bearer(token)),
    post: (url: string, body?: object) => t.agent.post(url).set('Authorization', bearer(token)).send(body),
    put: (url: string, body: object) => t.agent.put(url).set('Authorization', bearer(token)).send(body),
    patch: (url: string, body: object) => t.agent.patch(url).set('Authorization', bearer(token)).send(body),
    delete: (url: string) => t.agent.delete(url).set('Authorization', bearer(token)),
  };
}

/** A workshop of the demo facilitator from a template, to change freely. */
async function ownWorkshop(templateId: 'full-day' | 'half-day' | undefined = 'half-day'): Promise<{ id: string; agenda: AgendaItem[] }> {
  const res = await as(owner).post('/api/workshops', brief({ templateId }));
  expect(res.status).toBe(201);
  return res.body;
}

async function agendaOf(id: string): Promise<AgendaItem[]> {
  return (await as(owner).get(`/api/workshops/${id}`)).body.agenda;
}

describe('health', () => {
  it('answers ok and the schema version', async () => {
    const res = await t.agent.get('/api/health');
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ ok: true, schemaVersion: t.cairn.ctx.db.schemaVersion });
    expect(res.body.schemaVersion).toMatch(/^\d{4}-/);
  });
});

describe('the demo workshop', () => {
  it('is seeded for the facilitator with a full-day agenda for 18 people in three teams', async () => {
    const res = await as(owner).get(`/api/workshops/${demoId}`);
    expect(res.status).toBe(200);
    const full = TEMPLATES.find((x) => x.id === 'full-day')!;
    expect(res.body).toMatchObject({ title: DEMO_WORKSHOP_TITLE, myRole: 'owner', headcount: 18, teamCount: 3, window: full.window });
    expect(res.body.agenda.map((i: AgendaItem) => i.type)).toEqual(full.items.map((i) => i.type));
  });

  it('has a computed plan with no warnings, filling the day from 10:00', async () => {
    const res = await as(owner).get(`/api/workshops/${demoId}/plan`);
    expect(res.status).toBe(200);
    const { schedule, cautions } = res.body;
    expect(schedule.warnings).toEqual([]);
    expect(schedule.fullDay).toBe(true);
    expect(schedule.items[0].start).toBe('10:00');
    expect(schedule.loadPct).toBeLessThanOrEqual(85);
    expect(schedule.items.length).toBe((await agendaOf(demoId)).length);
    expect(Array.isArray(cautions)).toBe(true);
  });

  it('warns once the plan breaks a rule (control: the plan does react)', async () => {
    const w = await ownWorkshop('full-day');
    const talk = { type: 'talk', phase: 'opening', title: 'A long talk', timeboxMin: 120, minTimeboxMin: 60, prompt: '', settings: {} };
    expect((await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'talk', position: 0, item: talk })).status).toBe(201);
    const plan = await as(owner).get(`/api/workshops/${w.id}/plan`);
    const codes = plan.body.schedule.warnings.map((x: { code: string }) => x.code);
    expect(codes).toContain('talk_too_long');
  });
});

describe('creating a workshop', () => {
  it('from the half-day template copies its agenda and window, with new ids', async () => {
    const half = TEMPLATES.find((x) => x.id === 'half-day')!;
    const res = await as(owner).post('/api/workshops', brief({ templateId: 'half-day' }));
    expect(res.status).toBe(201);
    expect(res.body).toMatchObject({ title: 'Docking without the fuss', myRole: 'owner', window: half.window, teamCount: 3, packed: [] });
    expect(res.body.agenda.map((i: AgendaItem) => i.title)).toEqual(half.items.map((i) => i.title));
    // The template's placeholders are filled from the brief: its title is the topic.
    const prompts = res.body.agenda.map((i: AgendaItem) => i.prompt).join(' ');
    expect(prompts).toContain('“Docking without the fuss”');
    expect(prompts).not.toMatch(/\{topic\}|\{people\}/);
    const demoIds = new Set((await demoWorkshop(t)).itemIds);
    expect(res.body.agenda.every((i: AgendaItem) => !demoIds.has(i.id))).toBe(true);
    expect((await as(owner).get(`/api/workshops/${res.body.id}/plan`)).body.schedule.fullDay).toBe(false);
  });

  it('from blank has an empty agenda and the default day window', async () => {
    const res = await as(owner).post('/api/workshops', brief());
    expect(res.status).toBe(201);
    expect(res.body.agenda).toEqual([]);
    expect(res.body.window).toEqual({ doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' });
    expect(res.body.consentText.length).toBeGreaterThan(20);
  });

  it('refuses a bad brief with a message for each field', async () => {
    const res = await as(owner).post(
      '/api/workshops',
      brief({ title: 'ab', headcount: 0, window: { doorsOpen: '09:00', doorsClose: '17:00', start: '15:00', end: '11:00' } }),
    );
    expect(res.status).toBe(400);
    expect(res.body.error.code).toBe('validation_failed');
    expect(res.body.error.fields).toMatchObject({
      title: 'Give the workshop a title of at least 3 characters',
      headcount: 'A workshop needs at least 2 participants',
      'window.end': 'The workshop must end after it starts',
    });
  });

  it.each([
    ['title too short', { title: 'ab' }, 'title'],
    ['headcount 0', { headcount: 0 }, 'headcount'],
    ['window end before start', { window: { doorsOpen: '09:00', doorsClose: '17:00', start: '15:00', end: '11:00' } }, 'window.end'],
    ['no objective', { objective: '' }, 'objective'],
    ['a date that is not a date', { date: '13/03/2027' }, 'date'],
  ])('refuses %s alone, naming the field', async (_name, over, field) => {
    const res = await as(owner).post('/api/workshops', brief(over));
    expect(res.status).toBe(400);
    expect(Object.keys(res.body.error.fields)).toEqual([field]);
  });

  it('refuses a time that is not a 24-hour time', async () => {
    const res = await as(owner).post('/api/workshops', brief({ window: { doorsOpen: '9am', doorsClose: '17:00', start: '10:00', end: '16:00' } }));
    expect(res.status).toBe(400);
    expect(res.body.error.fields['window.doorsOpen']).toBe('Use a 24-hour time such as 09:30');
  });

  it('refuses the same mistakes when the brief is changed later', async () => {
    const w = await ownWorkshop();
    const res = await as(owner).patch(`/api/workshops/${w.id}`, { headcount: 0 });
    expect(res.status).toBe(400);
    expect(res.body.error.fields.headcount).toBe('A workshop needs at least 2 participants');
    const ok = await as(owner).patch(`/api/workshops/${w.id}`, { headcount: 24, venueNotes: 'Upstairs room, good light' });
    expect(ok.status).toBe(200);
    expect(ok.body).toMatchObject({ headcount: 24, venueNotes: 'Upstairs room, good light' });
  });
});

describe('the agenda', () => {
  it('adds an item from the library at the end, or at a position', async () => {
    const w = await ownWorkshop();
    const n = w.agenda.length;
    const added = await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'dot_vote' });
    expect(added.status).toBe(201);
    expect(added.body).toMatchObject({ type: 'dot_vote', phase: expect.any(String), timeboxMin: expect.any(Number) });
    const first = await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'break', position: 0 });
    expect(first.status).toBe(201);
    const agenda = await agendaOf(w.id);
    expect(agenda).toHaveLength(n + 2);
    expect(agenda[0].id).toBe(first.body.id);
    expect(agenda.at(-1)!.id).toBe(added.body.id);
  });

  it('refuses an unknown activity type', async () => {
    const w = await ownWorkshop();
    const res = await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'karaoke' });
    expect(res.status).toBe(400);
    expect(res.body.error.fields).toHaveProperty('type');
  });

  it('updates an item', async () => {
    const w = await ownWorkshop();
    const { id, ...item } = w.agenda[2];
    const res = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, {
      ...item,
      title: 'Ride-along interviews',
      timeboxMin: 40,
      minTimeboxMin: 30,
    });
    expect(res.status).toBe(200);
    expect(res.body).toMatchObject({ id, title: 'Ride-along interviews', timeboxMin: 40, minTimeboxMin: 30 });
    expect((await agendaOf(w.id))[2]).toMatchObject({ id, title: 'Ride-along interviews', timeboxMin: 40 });
  });

  it('pins an item to a clock time, unpins it, refuses a time that is not one, and copies with a told-apart title', async () => {
    const w = await ownWorkshop('full-day');
    const index = w.agenda.findIndex((i: AgendaItem) => i.type === 'lunch');
    const { id, ...lunch } = w.agenda[index];
    // The full-day template pins lunch at 12:00 (common practice: lunch 11:30–14:00 on a full day).
    expect(lunch.pinnedAt).toBe('12:00');
    const later = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, { ...lunch, pinnedAt: '12:30' });
    expect(later.status).toBe(200);
    const plan = await as(owner).get(`/api/workshops/${w.id}/plan`);
    // The morning ends at 12:00 (template counted by hand), so 30 min of buffer before lunch at 12:30.
    expect(plan.body.schedule.items[index]).toMatchObject({ start: '12:30', bufferBeforeMin: 30, pinned: true });
    const loose = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, { ...lunch, pinnedAt: null });
    expect(loose.body.pinnedAt).toBeUndefined();
    const bad = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, { ...lunch, pinnedAt: '25:99' });
    expect(bad.status).toBe(400);
    const copy = await as(owner).post(`/api/workshops/${w.id}/agenda/${w.agenda[0].id}/duplicate`);
    expect(copy.body.title).toBe(`${w.agenda[0].title} (copy)`);
  });

  it('refuses an update with a shortest timebox above the timebox, or a timebox of 0', async () => {
    const w = await ownWorkshop();
    const { id, ...item } = w.agenda[2];
    const longer = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, { ...item, timeboxMin: 10, minTimeboxMin: 20 });
    expect(longer.status).toBe(400);
    const zero = await as(owner).put(`/api/workshops/${w.id}/agenda/${id}`, { ...item, timeboxMin: 0 });
    expect(zero.status).toBe(400);
    expect(zero.body.error.fields.timeboxMin).toBe('A timebox is at least 1 minute');
  });

  // The rule "the shortest timebox cannot be longer than the timebox" lives in the shared schema,
  // so adding an item checks it as editing does.
  it('refuses to add an item whose shortest timebox is above its timebox', async () => {
    const w = await ownWorkshop();
    const item = { type: 'talk', phase: 'opening', title: 'Safety briefing', timeboxMin: 5, minTimeboxMin: 30, prompt: '', settings: {} };
    const res = await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'talk', item });
    expect(res.status).toBe(400);
  });

  it('duplicates an item right after itself with a new id', async () => {
    const w = await ownWorkshop();
    const source = w.agenda[3];
    const res = await as(owner).post(`/api/workshops/${w.id}/agenda/${source.id}/duplicate`);
    expect(res.status).toBe(201);
    expect(res.body.id).not.toBe(source.id);
    const { id: _a, ...copy } = res.body;
    const { id: _b, ...original } = source;
    // Everything is copied but the title, which tells the copy from the original.
    expect(copy).toEqual({ ...original, title: `${original.title} (copy)` });
    const agenda = await agendaOf(w.id);
    expect(agenda).toHaveLength(w.agenda.length + 1);
    expect(agenda[4].id).toBe(res.body.id);
    expect(agenda[5].id).toBe(w.agenda[4].id);
  });

  it('deletes an item and closes the gap', async () => {
    const w = await ownWorkshop();
    const gone = w.agenda[1];
    expect((await as(owner).delete(`/api/workshops/${w.id}/agenda/${gone.id}`)).status).toBe(204);
    const agenda = await agendaOf(w.id);
    expect(agenda.map((i) => i.id)).toEqual(w.agenda.filter((i) => i.id !== gone.id).map((i) => i.id));
    // With the gap closed, adding at the end lands right after the last item.
    const added = await as(owner).post(`/api/workshops/${w.id}/agenda`, { type: 'closing' });
    expect((await agendaOf(w.id)).at(-1)!.id).toBe(added.body.id);
    expect((await as(owner).delete(`/api/workshops/${w.id}/agenda/${gone.id}`)).status).toBe(404);
  });

  it('reorders the agenda, and refuses a list that is not every item exactly once', async () => {
    const w = await ownWorkshop();
    const ids = w.agenda.map((i) => i.id);
    const reversed = [...ids].reverse();
    const res = await as(owner).put(`/api/workshops/${w.id}/agenda-order`, { ids: reversed });
    expect(res.status).toBe(200);
    expect(res.body.map((i: AgendaItem) => i.id)).toEqual(reversed);
    expect((await agendaOf(w.id)).map((i) => i.id)).toEqual(reversed);

    const wrong = [
      ids.slice(1),
      [...ids.slice(1), 'not-an-item'],
      [...ids.slice(1), ids[1]],
      [...ids, 'not-an-item'],
    ];
    for (const list of wrong) {
      const bad = await as(owner).put(`/api/workshops/${w.id}/agenda-order`, { ids: list });
      expect(bad.status).toBe(400);
      expect(bad.body.error.message).toMatch(/every item of the agenda exactly once/);
    }
    expect((await agendaOf(w.id)).map((i) => i.id)).toEqual(reversed);
  });

  it('does not reach into another workshop’s items', async () => {
    const mine = await ownWorkshop();
    const demoItem = (await demoWorkshop(t)).itemIds[0];
    expect((await as(owner).delete(`/api/workshops/${mine.id}/agenda/${demoItem}`)).status).toBe(404);
    expect((await as(owner).post(`/api/workshops/${mine.id}/agenda/${demoItem}/duplicate`)).status).toBe(404);
  });
});

describe('the packing list', () => {
  it('has dot stickers for every voter plus spare, with Cairn’s reason for the number', async () => {
    const res = await as(owner).get(`/api/workshops/${demoId}/materials`);
    expect(res.status).toBe(200);
    const dots = res.body.lines.find((l: { key: string }) => l.key === 'dot_stickers');
    expect(dots).toBeDefined();
    // Dots per voter × criteria × 18 voters, plus half again as spare.
    const agenda = await agendaOf(demoId);
    const votes = agenda.filter((i) => i.type === 'dot_vote');
    expect(votes.length).toBeGreaterThan(0);
    const raw = votes.reduce((sum, v) => sum + (v.settings.dotsPerVoter ?? 1) * Math.max(1, v.settings.criteria?.length ?? 0) * 18 * 1.5, 0);
    expect(dots.quantity).toBe(Math.ceil(raw));
    // Cairn's reason as a message id, worded by the screen: `packingWhy.dots_spare` ("every voter’s dots and half again spare").
    expect(dots.shares[0].why).toEqual({ message: 'dots_spare', params: {} });
    // Where the numbers come from stays in the code: the answer names no source.
    expect(JSON.stringify(res.body)).not.toMatch(/handbook|Global Learning|d\.school|method card|published/i);
    expect(dots.usedBy).toEqual(votes.map((v) => v.id));
    expect(res.body.lines.map((l: { key: string }) => l.key)).toContain('sticky_notes');
  });

  it('can be ticked off, and keeps what was ticked', async () => {
    const w = await ownWorkshop('full-day');
    const ticked = await as(owner).put(`/api/workshops/${w.id}/materials/packed`, { keys: ['dot_stickers', 'markers', 'dot_stickers'] });
    expect(ticked.status).toBe(200);
    expect(ticked.body).toEqual({ packed: ['dot_stickers', 'markers'] });
    expect((await as(owner).get(`/api/workshops/${w.id}/materials`)).body.packed).toEqual(['dot_stickers', 'markers']);
    const cleared = await as(owner).put(`/api/workshops/${w.id}/materials/packed`, { keys: [] });
    expect(cleared.body.packed).toEqual([]);
  });
});

describe('who may do what with a workshop', () => {
  it('lets the observer read the workshop, plan and packing list but not change them', async () => {
    expect((await as(observer).get(`/api/workshops/${demoId}`)).body.myRole).toBe('observer');
    expect((await as(observer).get(`/api/workshops/${demoId}/plan`)).status).toBe(200);
    expect((await as(observer).get(`/api/workshops/${demoId}/materials`)).status).toBe(200);
    const before = await agendaOf(demoId);
    const tries = [
      await as(observer).patch(`/api/workshops/${demoId}`, { headcount: 30 }),
      await as(observer).post(`/api/workshops/${demoId}/agenda`, { type: 'break' }),
      await as(observer).put(`/api/workshops/${demoId}/agenda-order`, { ids: before.map((i) => i.id).reverse() }),
      await as(observer).delete(`/api/workshops/${demoId}/agenda/${before[0].id}`),
      await as(observer).put(`/api/workshops/${demoId}/materials/packed`, { keys: ['markers'] }),
    ];
    for (const res of tries) {
      expect(res.status).toBe(403);
      expect(res.body.error).toEqual({ code: 'forbidden', message: 'Your role does not allow this' });
    }
    expect(await agendaOf(demoId)).toEqual(before);
  });

  it('keeps the stranger out, even from reading', async () => {
    for (const url of [`/api/workshops/${demoId}`, `/api/workshops/${demoId}/plan`, `/api/workshops/${demoId}/materials`]) {
      expect((await as(stranger.token).get(url)).status).toBe(403);
    }
    const list = await as(stranger.token).get('/api/workshops');
    expect(list.body.map((w: { id: string }) => w.id)).not.toContain(demoId);
  });

  it('lets a co-facilitator plan, but only the owner delete', async () => {
    const cofac = as(cofacilitator.token);
    expect((await cofac.get(`/api/workshops/${demoId}`)).body.myRole).toBe('cofacilitator');
    expect((await cofac.patch(`/api/workshops/${demoId}`, { venueNotes: 'Bring the long extension lead' })).status).toBe(200);

    const w = await ownWorkshop();
    await addMember(t, w.id, cofacilitator.id, 'cofacilitator');
    await addMember(t, w.id, await demoUserId(t, 'observer'), 'observer');
    expect((await as(observer).delete(`/api/workshops/${w.id}`)).status).toBe(403);
    expect((await cofac.delete(`/api/workshops/${w.id}`)).status).toBe(403);
    expect((await as(admin).delete(`/api/workshops/${w.id}`)).status).toBe(403);
    expect((await as(owner).get(`/api/workshops/${w.id}`)).status).toBe(200);
    expect((await as(owner).delete(`/api/workshops/${w.id}`)).status).toBe(204);
    expect((await as(owner).get(`/api/workshops/${w.id}`)).status).toBe(404);
    expect((await as(cofacilitator.token).get('/api/workshops')).body.map((x: { id: string }) => x.id)).not.toContain(w.id);
  });

  it('shows the admin every workshop, and each facilitator only their own and those they were invited to', async () => {
    const theirs = await as(stranger.token).post('/api/workshops', brief({ title: 'Stranger’s own workshop' }));
    expect(theirs.status).toBe(201);
    const adminList = (await as(admin).get('/api/workshops')).body as { id: string; myRole: string }[];
    expect(adminList.map((w) => w.id)).toEqual(expect.arrayContaining([demoId, theirs.body.id]));
    expect(adminList.find((w) => w.id === demoId)?.myRole).toBe('admin');
    expect((await as(admin).get(`/api/workshops/${theirs.body.id}`)).body.myRole).toBe('admin');

    const ownerList = (await as(owner).get('/api/workshops')).body as { id: string; myRole: string; itemCount: number }[];
    expect(ownerList.map((w) => w.id)).not.toContain(theirs.body.id);
    expect(ownerList.find((w) => w.id === demoId)).toMatchObject({ myRole: 'owner', ownerName: 'Mira Calder' });
    expect(ownerList.find((w) => w.id === demoId)!.itemCount).toBeGreaterThan(10);

    const observerList = (await as(observer).get('/api/workshops')).body as { id: string; myRole: string }[];
    expect(observerList.find((w) => w.id === demoId)?.myRole).toBe('observer');
    expect(observerList.map((w) => w.id)).not.toContain(theirs.body.id);
  });
});

describe('restarting on the same data folder', () => {
  it('keeps the data and seeds only on the first start', async () => {
    const dir = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-restart-'));
    try {
      const first = await startTestApp({ DATA_DIR: dir });
      const seeded = await demoWorkshop(first);
      const ownerToken = await first.tokenFor('facilitator');
      const kept = await first.agent
        .post('/api/workshops')
        .set('Authorization', bearer(ownerToken))
        .send(brief({ title: 'Kept across restarts', templateId: 'half-day' }));
      expect(kept.status).toBe(201);
      // Deleting the demo shows whether the second start seeds again: it would bring it back.
      expect((await first.agent.delete(`/api/workshops/${seeded.id}`).set('Authorization', bearer(ownerToken))).status).toBe(204);
      const usersBefore = await first.cairn.ctx.db.models.User.count();
      await first.close();

      const second = await startTestApp({ DATA_DIR: dir });
      try {
        const { Workshop, User } = second.cairn.ctx.db.models;
        expect(await User.count()).toBe(usersBefore);
        expect(await Workshop.count({ where: { title: DEMO_WORKSHOP_TITLE } })).toBe(0);
        const again = await second.agent.get(`/api/workshops/${kept.body.id}`).set('Authorization', bearer(await second.tokenFor('facilitator')));
        expect(again.status).toBe(200);
        expect(again.body.agenda).toEqual(kept.body.agenda);
        // The token signed by the first start still works: same secret, same account.
        expect((await second.agent.get('/api/auth/me').set('Authorization', bearer(ownerToken))).status).toBe(200);
      } finally {
        await second.close();
      }
    } finally {
      await fs.rm(dir, { recursive: true, force: true });
    }
  });
});
