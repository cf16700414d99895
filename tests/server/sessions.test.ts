import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PNG } from 'pngjs';
import { parse } from 'csv-parse/sync';
import { bearer, commandData, joinLive, startLive, startTestApp, type ClientSocket, type TestApp } from './helpers';
import { WorkshopResults } from '../../shared/schemas/results';
import type { SessionSummary } from '../../shared/schemas/live';
import type { AgendaItem } from '../../shared/schemas/agenda-item';

// A rehearsal the evening before and the day itself, on one workshop: the results cover the day unless
// asked otherwise, every row names its session, and discarding a session deletes what the room put in it.

let t: TestApp;
let token: string;
let workshopId: string;
let agenda: AgendaItem[];
const sessions: Record<'rehearsal' | 'day', { id: string; phone: { id: string; token: string; socket: ClientSocket } }> = {} as never;

/** A small PNG (a plain square), enough for a sketch photo. */
function png(): Buffer {
  const image = new PNG({ width: 32, height: 24 });
  image.data.fill(200);
  return PNG.sync.write(image);
}

const indexOf = (type: string) => agenda.findIndex((i) => i.type === type);

/** Runs one session: a phone joins, writes a note, uploads a sketch and puts a dot on a vote; then the session ends. */
async function runSession(kind: 'rehearsal' | 'day', name: string, note: string): Promise<void> {
  const info = await startLive(t, token, workshopId, kind);
  expect(info.kind).toBe(kind);
  const owner = await t.connect(token);
  await commandData(owner, 'session:watch', { sessionId: info.sessionId });
  const joined = await joinLive(t, info.joinCode, { displayName: name });
  const socket = await t.connect(joined.token);
  await commandData(socket, 'session:sync');
  sessions[kind] = { id: info.sessionId, phone: { id: joined.me.id, token: joined.token, socket } };

  const insights = indexOf('insights');
  await commandData(owner, 'session:goto', { index: insights });
  await commandData(socket, 'submission:create', { clientId: crypto.randomUUID(), itemId: agenda[insights]!.id, kind: 'note', text: note });

  const sketch = indexOf('sketch');
  await commandData(owner, 'session:goto', { index: sketch });
  const photo = await t.agent
    .post('/api/live/photos')
    .set('Authorization', bearer(joined.token))
    .field('itemId', agenda[sketch]!.id)
    .field('clientId', crypto.randomUUID())
    .field('caption', `${name}'s dock map`)
    .field('showsPeople', 'false')
    .field('peopleConsent', 'false')
    .attach('photo', png(), { filename: 'sketch.png', contentType: 'image/png' });
  expect(photo.status, JSON.stringify(photo.body)).toBe(201);

  await commandData(owner, 'session:goto', { index: indexOf('dot_vote') });
  const vote = await commandData(owner, 'vote:setup', { options: [{ text: 'Clear unlock steps' }, { text: 'A calm first route' }] });
  await commandData(owner, 'vote:open');
  await commandData(socket, 'vote:dot', { clientId: crypto.randomUUID(), optionId: vote.options[0]!.id, criterionId: 'overall', delta: 1 });
  await commandData(owner, 'vote:close');

  const stopped = await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(token));
  expect(stopped.status).toBe(200);
  socket.disconnect();
  owner.disconnect();
}

async function get(path: string) {
  const res = await t.agent.get(`/api/workshops/${workshopId}${path}`).set('Authorization', bearer(token));
  expect(res.status, JSON.stringify(res.body).slice(0, 300)).toBe(200);
  return res;
}

async function results(query = ''): Promise<WorkshopResults> {
  return WorkshopResults.parse((await get(`/results${query}`)).body);
}

beforeAll(async () => {
  t = await startTestApp();
  token = await t.tokenFor('facilitator');
  const made = await t.agent
    .post('/api/workshops')
    .set('Authorization', bearer(token))
    .send({ title: 'Harbour Lane: rehearsal and the day', objective: "Improve a new member's first ride", date: '2027-03-13', headcount: 12, templateId: 'full-day' });
  expect(made.status).toBe(201);
  workshopId = made.body.id;
  agenda = made.body.agenda;
  await runSession('rehearsal', 'Rehearsal Robin', 'A note from the rehearsal');
  await runSession('day', 'Ana Lima', 'A note from the day');
});
afterAll(() => t.close());

describe('the sessions of a workshop', () => {
  it('lists each session with its kind, times, who joined, notes and ballots', async () => {
    const list = (await get('/sessions')).body as SessionSummary[];
    expect(list.map((s) => [s.id, s.kind, s.status, s.joined, s.votes])).toEqual([
      [sessions.rehearsal.id, 'rehearsal', 'ended', 1, 1],
      [sessions.day.id, 'day', 'ended', 1, 1],
    ]);
    // The note and the sketch (a submission with its photo) of each session.
    expect(list.map((s) => s.notes)).toEqual([2, 2]);
    expect(list.every((s) => s.endedAt !== null && s.endedAt >= s.startedAt)).toBe(true);
  });

  it('covers the day only by default, and every section says which session it comes from', async () => {
    const r = await results();
    expect(r.sessionSelector).toBe('day');
    expect(r.sessions.map((s) => [s.kind, s.included])).toEqual([
      ['rehearsal', false],
      ['day', true],
    ]);
    expect(r.notes.map((n) => n.text)).toEqual(['A note from the day', 'Ana Lima\'s dock map']);
    expect(r.participants.map((p) => p.name)).toEqual(['Ana Lima']);
    const day = r.sessions[1]!;
    const sections = r.activities.flatMap((a) => a.sections);
    expect(sections.length).toBeGreaterThanOrEqual(3);
    expect(new Set(sections.map((s) => s.session))).toEqual(new Set([day.name]));
    expect(day.name).toMatch(/^The day · \d{4}-\d{2}-\d{2} \d{2}:\d{2}$/);
    // The agenda as run is the day's own: the rehearsal's runs do not leak into it.
    expect(day.agenda.filter((a) => a.runCount > 0).map((a) => a.runCount)).toEqual([1, 1, 1, 1]);
    expect(r.sessions[0]!.agenda).toEqual([]);
  });

  it('covers every session, or the ones named, on request, each vote block once per session', async () => {
    const all = await results('?sessions=all');
    expect(all.notes.filter((n) => n.kind === 'note').map((n) => [n.session.split(' · ')[0], n.text])).toEqual([
      ['Rehearsal', 'A note from the rehearsal'],
      ['The day', 'A note from the day'],
    ]);
    const voteItem = all.activities.find((a) => a.type === 'dot_vote')!;
    expect(voteItem.sections.filter((s) => s.kind === 'votes').map((s) => s.session!.split(' · ')[0])).toEqual(['Rehearsal', 'The day']);
    const named = await results(`?sessions=${sessions.rehearsal.id}`);
    expect(named.notes.filter((n) => n.kind === 'note').map((n) => n.text)).toEqual(['A note from the rehearsal']);
    const bad = await t.agent.get(`/api/workshops/${workshopId}/results?sessions=${encodeURIComponent("day'; drop")}`).set('Authorization', bearer(token));
    expect(bad.status).toBe(400);
  });

  it('names the session on every CSV row and filters the JSON export the same way', async () => {
    // RFC 4180 read back with an independent parser (csv-parse).
    const rows = (file: string, query = '') =>
      get(`/exports/${file}${query}`).then((res) => parse(res.text, { relaxColumnCount: false }) as string[][]);
    for (const file of ['notes.csv', 'teams.csv', 'participants.csv', 'tallies.csv', 'votes.csv']) {
      const [header, ...records] = await rows(file, '?sessions=all');
      expect(header![0], file).toBe('Session');
      for (const record of records) expect(record[0], file).toMatch(/^(Rehearsal|The day) · /);
    }
    const tallies = await rows('tallies.csv');
    expect(new Set(tallies.slice(1).map((r) => r[0]!.split(' · ')[0]))).toEqual(new Set(['The day']));
    const json = WorkshopResults.parse(JSON.parse((await get(`/exports/results.json?sessions=${sessions.rehearsal.id}`)).text));
    expect(json.votes.map((v) => [v.session.split(' · ')[0], v.voter])).toEqual([['Rehearsal', 'Rehearsal Robin']]);
  });

  it('lets the facilitator mark a session as the day or a rehearsal, which changes what the results cover', async () => {
    const marked = await t.agent
      .put(`/api/workshops/${workshopId}/sessions/${sessions.rehearsal.id}`)
      .set('Authorization', bearer(token))
      .send({ kind: 'day' });
    expect(marked.status).toBe(200);
    expect(marked.body.kind).toBe('day');
    expect((await results()).participants.map((p) => p.name)).toEqual(['Rehearsal Robin', 'Ana Lima']);
    await t.agent.put(`/api/workshops/${workshopId}/sessions/${sessions.rehearsal.id}`).set('Authorization', bearer(token)).send({ kind: 'rehearsal' });
    expect((await results()).participants.map((p) => p.name)).toEqual(['Ana Lima']);
  });
});

describe('discarding a session', () => {
  it('refuses without a confirmation, and refuses a session still live', async () => {
    const unconfirmed = await t.agent.post(`/api/workshops/${workshopId}/sessions/${sessions.rehearsal.id}/discard`).set('Authorization', bearer(token)).send({});
    expect(unconfirmed.status).toBe(400);
    const live = await startLive(t, token, workshopId, 'rehearsal');
    const refused = await t.agent.post(`/api/workshops/${workshopId}/sessions/${live.sessionId}/discard`).set('Authorization', bearer(token)).send({ confirm: true });
    expect(refused.status).toBe(409);
    await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(token));
    expect(
      (await t.agent.post(`/api/workshops/${workshopId}/sessions/${live.sessionId}/discard`).set('Authorization', bearer(token)).send({ confirm: true })).status,
    ).toBe(204);
  });

  it('deletes the participants, notes, photos with their files, and votes of the session, and nothing of the others', async () => {
    const { Participant, Submission, Photo, Vote, VoteDot } = t.cairn.ctx.db.models;
    const photos = await Photo.findAll({ where: { sessionId: sessions.rehearsal.id } });
    expect(photos).toHaveLength(1);
    const filesBefore = await fs.readdir(t.cairn.ctx.config.uploadDir);
    const mine = filesBefore.filter((f) => f.startsWith(`${photos[0]!.storageKey}.`));
    expect(mine.length).toBeGreaterThan(0);
    const votes = await Vote.findAll({ where: { sessionId: sessions.rehearsal.id } });

    const res = await t.agent
      .post(`/api/workshops/${workshopId}/sessions/${sessions.rehearsal.id}/discard`)
      .set('Authorization', bearer(token))
      .send({ confirm: true });
    expect(res.status).toBe(204);

    expect(await t.cairn.ctx.db.models.LiveSession.count({ where: { id: sessions.rehearsal.id } })).toBe(0);
    expect(await Participant.count({ where: { sessionId: sessions.rehearsal.id } })).toBe(0);
    expect(await Submission.count({ where: { sessionId: sessions.rehearsal.id } })).toBe(0);
    expect(await Photo.count({ where: { sessionId: sessions.rehearsal.id } })).toBe(0);
    expect(await Vote.count({ where: { sessionId: sessions.rehearsal.id } })).toBe(0);
    expect(await VoteDot.count({ where: { voteId: votes.map((v) => v.id) } })).toBe(0);
    const filesAfter = await fs.readdir(t.cairn.ctx.config.uploadDir);
    for (const f of mine) expect(filesAfter).not.toContain(f);

    // The day is untouched.
    expect(await Participant.count({ where: { sessionId: sessions.day.id } })).toBe(1);
    expect(await Photo.count({ where: { sessionId: sessions.day.id } })).toBe(1);
    expect(filesAfter.length).toBe(filesBefore.length - mine.length);
    const list = (await get('/sessions')).body as SessionSummary[];
    expect(list.map((s) => s.id)).toEqual([sessions.day.id]);
    expect((await results('?sessions=all')).notes.map((n) => n.text)).toEqual(['A note from the day', "Ana Lima's dock map"]);
  });

  it('answers not found for a session of another workshop or none', async () => {
    const res = await t.agent.post(`/api/workshops/${workshopId}/sessions/no-such-session/discard`).set('Authorization', bearer(token)).send({ confirm: true });
    expect(res.status).toBe(404);
  });
});
