import fs from 'node:fs/promises';
import crypto from 'node:crypto';
import sharp from 'sharp';
import * as pdfjs from 'pdfjs-dist/legacy/build/pdf.mjs';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, commandData, liveDay, startTestApp, type LiveDay, type TestApp } from './helpers';
import { RetentionService } from '../../server/features/results/retention.service';
import { WorkshopResults, type ResultSection } from '../../shared/schemas/results';

let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t?.close());

/** A small PNG as a phone's camera would send (a plain teal picture). */
function png(): Promise<Buffer> {
  return sharp({ create: { width: 64, height: 48, channels: 3, background: '#0b5d5b' } }).png().toBuffer();
}

/** A phone uploads a photo to the current item (multipart, as the phone does). */
async function upload(day: LiveDay, phone: number, itemId: string, caption: string, showsPeople: boolean, peopleConsent = false): Promise<string> {
  const res = await t.agent
    .post('/api/live/photos')
    .set('Authorization', bearer(day.phones[phone]!.answer.token))
    .field('itemId', itemId)
    .field('clientId', `photo-${crypto.randomUUID()}`)
    .field('caption', caption)
    .field('showsPeople', String(showsPeople))
    .field('peopleConsent', String(peopleConsent))
    .attach('photo', await png(), { filename: 'sketch.png', contentType: 'image/png' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.photoId as string;
}

async function results(day: LiveDay, query = ''): Promise<WorkshopResults> {
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results${query}`).set('Authorization', bearer(day.ownerToken));
  expect(res.status).toBe(200);
  return WorkshopResults.parse(res.body);
}

function section<K extends ResultSection['kind']>(r: WorkshopResults, type: string, kind: K): Extract<ResultSection, { kind: K }> | undefined {
  return r.activities.find((a) => a.type === type)?.sections.find((s) => s.kind === kind) as Extract<ResultSection, { kind: K }> | undefined;
}

/** How many pictures a PDF draws, counted with PDF.js (an independent reader) from each page's drawing operations. */
async function picturesIn(pdf: Buffer): Promise<number> {
  const doc = await pdfjs.getDocument({ data: new Uint8Array(pdf), isEvalSupported: false }).promise;
  let n = 0;
  for (let i = 1; i <= doc.numPages; i++) {
    const ops = await (await doc.getPage(i)).getOperatorList();
    n += ops.fnArray.filter((fn) => fn === pdfjs.OPS.paintImageXObject || fn === pdfjs.OPS.paintInlineImageXObject).length;
  }
  await doc.destroy();
  return n;
}

async function reportPdf(day: LiveDay): Promise<Buffer> {
  const res = await t.agent
    .get(`/api/workshops/${day.workshopId}/report.pdf`)
    .set('Authorization', bearer(day.ownerToken))
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
  expect(res.status).toBe(200);
  return res.body as Buffer;
}

/** Files in the upload folder that belong to the given photos (every copy starts with the photo's storage key). */
async function photoFiles(photoIds: string[]): Promise<string[]> {
  const rows = await t.cairn.ctx.db.models.Photo.findAll({ where: { id: photoIds } });
  const names = await fs.readdir(t.cairn.ctx.config.uploadDir).catch(() => [] as string[]);
  return names.filter((n) => rows.some((r) => n.startsWith(r.storageKey)));
}

/** A live day with notes, a closed dot vote, sketch and storyboard photos, and one address left for the report. */
async function dayWithPersonalData(title: string): Promise<{ day: LiveDay; photoIds: string[] }> {
  const day = await liveDay(t, {
    title,
    phones: [
      { displayName: 'Ana Lima', photoConsent: true },
      { displayName: 'Ben Okafor', photoConsent: false },
      { displayName: 'Chidi Brandt', photoConsent: true },
    ],
    teams: [
      { name: 'Team Dock', challenge: 'Make unlocking obvious', phones: [0, 1] },
      { name: 'Team Route', challenge: 'A calm first route', phones: [2] },
    ],
    notes: [
      { type: 'insights', phone: 0, text: 'Unlocking took three tries' },
      { type: 'insights', phone: 1, text: 'The dock beeped, twice' },
      { type: 'insights', phone: 2, text: 'Nobody knew where to ride first' },
    ],
    stop: false,
  });
  const index = (type: string) => day.agenda.findIndex((i) => i.type === type);
  // A dot vote: two options, everyone votes, the facilitator closes it.
  await commandData(day.owner, 'session:goto', { index: index('dot_vote') });
  const vote = await commandData(day.owner, 'vote:setup', {
    options: [{ text: 'Make unlocking obvious' }, { text: 'A calm first route' }],
    rules: { dotsPerVoter: 2, capPerOption: 2, allowStacking: true, criteria: [], topN: 1 },
  });
  await commandData(day.owner, 'vote:open', {});
  const [first, second] = vote.options;
  for (const [phone, option] of [[0, first], [1, first], [2, second], [0, first]] as const) {
    await commandData(day.phones[phone]!.socket, 'vote:dot', { clientId: `dot-${crypto.randomUUID()}`, optionId: option!.id, criterionId: 'overall', delta: 1 });
  }
  await commandData(day.owner, 'vote:close', {});
  // Sketches: Ana's shows nobody; Ben's shows people, but Ben gave no photo consent.
  await commandData(day.owner, 'session:goto', { index: index('sketch') });
  const sketch = day.agenda[index('sketch')]!.id;
  const photoIds = [await upload(day, 0, sketch, 'A dock with a big green arrow', false), await upload(day, 1, sketch, 'Us at the dock', true, true)];
  // A storyboard frame with a photo of people who all agreed.
  await commandData(day.owner, 'session:goto', { index: index('storyboard') });
  photoIds.push(await upload(day, 2, day.agenda[index('storyboard')]!.id, 'Frame 1: the welcome ride', true, true));
  const left = await t.agent.put('/api/participant/report-email').set('Authorization', bearer(day.phones[0]!.answer.token)).send({ email: 'ana@harbourlane.example' });
  expect(left.status).toBe(200);
  return { day, photoIds };
}

describe('deleting personal data now', () => {
  let day: LiveDay;
  let photoIds: string[];
  let before: WorkshopResults;

  beforeAll(async () => {
    ({ day, photoIds } = await dayWithPersonalData('Harbour Lane: delete now'));
  });

  it('shows photos only where consent allows, before anything is deleted', async () => {
    before = await results(day);
    const sketches = section(before, 'sketch', 'photos')!;
    expect(sketches.photos.map((p) => [p.caption, p.author, p.shown, p.url !== null])).toEqual([
      ['A dock with a big green arrow', 'Ana Lima', true, true],
      ['Us at the dock', 'Ben Okafor', false, false],
    ]);
    expect(sketches.withheld).toBe(1);
    const shown = await t.agent.get(sketches.photos[0]!.url!).set('Authorization', bearer(await t.tokenFor('observer')));
    expect(shown.status).toBe(200);
    expect(shown.headers['content-type']).toBe('image/jpeg');
    const board = section(before, 'storyboard', 'storyboards')!;
    expect(board.boards[0]!.frames[0]).toMatchObject({ text: 'Frame 1: the welcome ride', photoId: photoIds[2] });
    // The printed report shows the same two pictures, and never Ben's.
    expect(await picturesIn(await reportPdf(day))).toBe(2);
    expect(section(before, 'dot_vote', 'votes')!.overall.map((r) => [r.label, r.score, r.rank, r.selected])).toEqual([
      ['Make unlocking obvious', 3, 1, true],
      ['A calm first route', 1, 2, false],
    ]);
  });

  it('hides a photo of people once its author withdraws photo consent from the phone', async () => {
    const chidi = day.phones[2]!.socket;
    await commandData(chidi, 'participant:consent', { photoConsent: false });
    const r = await results(day);
    expect(section(r, 'storyboard', 'storyboards')!.boards[0]!.frames[0]!.photoId).toBeNull();
    expect(r.participants[2]!.photoConsent).toBe(false);
    await commandData(chidi, 'participant:consent', { photoConsent: true });
  });

  it('waits while the session is live', async () => {
    const res = await t.agent
      .post(`/api/workshops/${day.workshopId}/retention/delete-now`)
      .set('Authorization', bearer(day.ownerToken))
      .send({ confirm: true });
    expect(res.status).toBe(409);
    expect(res.body.error.message).toMatch(/end it first/);
  });

  it('asks for a confirmation on purpose', async () => {
    const res = await t.agent.post(`/api/workshops/${day.workshopId}/retention/delete-now`).set('Authorization', bearer(day.ownerToken)).send({ confirm: 'yes' });
    expect(res.status).toBe(400);
  });

  it('deletes names, photos (rows and files), addresses and spent invitations, and keeps anonymous notes, teams and tallies', async () => {
    await t.agent.post(`/api/workshops/${day.workshopId}/live/stop`).set('Authorization', bearer(day.ownerToken));
    before = await results(day);
    const status = await t.agent.get(`/api/workshops/${day.workshopId}/retention`).set('Authorization', bearer(day.ownerToken));
    expect(status.body).toMatchObject({ retentionDays: null, dueAt: null, personalDataDeletedAt: null, liveNow: false, held: { names: 3, addresses: 1, photos: 3 } });
    expect((await photoFiles(photoIds)).length).toBeGreaterThanOrEqual(3);
    const storageKeys = (await t.cairn.ctx.db.models.Photo.findAll({ where: { id: photoIds } })).map((p) => p.storageKey);
    // Three invitations to the workshop: accepted, expired and still pending.
    const { Invitation } = t.cairn.ctx.db.models;
    const invited = { workshopId: day.workshopId, role: 'observer' as const, invitedById: (await t.cairn.ctx.db.models.Workshop.findByPk(day.workshopId))!.ownerId };
    const day0 = Date.now();
    for (const [email, acceptedAt, expiresAt] of [
      ['accepted@harbourlane.example', new Date(day0 - 86_400_000), new Date(day0 + 86_400_000)],
      ['expired@harbourlane.example', null, new Date(day0 - 60_000)],
      ['pending@harbourlane.example', null, new Date(day0 + 86_400_000)],
    ] as const) {
      await Invitation.create({ id: crypto.randomUUID(), ...invited, email, tokenHash: crypto.randomBytes(32).toString('hex'), acceptedAt, expiresAt });
    }

    const res = await t.agent.post(`/api/workshops/${day.workshopId}/retention/delete-now`).set('Authorization', bearer(day.ownerToken)).send({ confirm: true });
    expect(res.status, JSON.stringify(res.body)).toBe(200);
    expect(res.body.held).toEqual({ names: 0, addresses: 0, photos: 0 });
    expect(res.body.personalDataDeletedAt).toBeGreaterThan(0);

    // What remains in the database: participants renamed in order of joining, no address, no device id.
    const people = await t.cairn.ctx.db.models.Participant.findAll({ where: { sessionId: day.sessionId }, order: [['joinedAt', 'ASC']] });
    expect(people.map((p) => [p.displayName, p.email, p.deviceId.startsWith('erased-')])).toEqual([
      ['Participant 1', null, true],
      ['Participant 2', null, true],
      ['Participant 3', null, true],
    ]);
    expect(await t.cairn.ctx.db.models.Photo.count({ where: { id: photoIds } })).toBe(0);
    expect((await Invitation.findAll({ where: { workshopId: day.workshopId } })).map((i) => i.email)).toEqual(['pending@harbourlane.example']);
    const left = await fs.readdir(t.cairn.ctx.config.uploadDir).catch(() => [] as string[]);
    expect(left.filter((n) => storageKeys.some((k) => n.startsWith(k)))).toEqual([]);

    const after = await results(day);
    const text = JSON.stringify(after);
    for (const name of ['Ana Lima', 'Ben Okafor', 'Chidi Brandt', 'ana@harbourlane.example']) expect(text).not.toContain(name);
    // Notes stay word for word, now by "Participant N"; the tally and the teams' challenges stay too.
    expect(after.notes.map((n) => [n.text, n.author])).toEqual(before.notes.map((n) => [n.text, `Participant ${before.participants.findIndex((p) => p.id === n.participantId) + 1}`]));
    expect(section(after, 'dot_vote', 'votes')!.overall).toEqual(section(before, 'dot_vote', 'votes')!.overall);
    expect(after.teams.map((tm) => [tm.name, tm.challenge, tm.members.map((m) => m.name)])).toEqual([
      ['Team Dock', 'Make unlocking obvious', ['Participant 1', 'Participant 2']],
      ['Team Route', 'A calm first route', ['Participant 3']],
    ]);
    expect(section(after, 'sketch', 'photos')).toBeUndefined();
    expect(section(after, 'storyboard', 'storyboards')!.boards[0]!.frames[0]).toMatchObject({ text: 'Frame 1: the welcome ride', photoId: null });
    expect(after.participation.withAddress).toBe(0);
    expect(await picturesIn(await reportPdf(day))).toBe(0);
    expect(after.personalDataDeletedAt).toBe(res.body.personalDataDeletedAt);
    // The votes export keeps every dot, by voters who are now numbers.
    const votes = await t.agent.get(`/api/workshops/${day.workshopId}/exports/votes.csv`).set('Authorization', bearer(day.ownerToken));
    expect(votes.text).toContain('Participant 1,Make unlocking obvious,Dots,2');
  });

  it('keeps the observer out of deleting', async () => {
    const res = await t.agent
      .post(`/api/workshops/${day.workshopId}/retention/delete-now`)
      .set('Authorization', bearer(await t.tokenFor('observer')))
      .send({ confirm: true });
    expect(res.status).toBe(403);
  });
});

describe('deleting personal data after a set number of days', () => {
  it('sets the days, computes when they are due, and a sweep deletes only what is due', async () => {
    const { day: due } = await dayWithPersonalData('Harbour Lane: due in 7 days');
    const { day: later } = await dayWithPersonalData('Harbour Lane: due in 30 days');
    for (const d of [due, later]) await t.agent.post(`/api/workshops/${d.workshopId}/live/stop`).set('Authorization', bearer(d.ownerToken));
    const set = async (d: LiveDay, days: number | null) =>
      t.agent.put(`/api/workshops/${d.workshopId}/retention`).set('Authorization', bearer(d.ownerToken)).send({ retentionDays: days });
    expect((await set(due, -1)).status).toBe(400);
    expect((await set(due, 1.5)).status).toBe(400);
    const seven = await set(due, 7);
    expect(seven.status).toBe(200);
    const session = await t.cairn.ctx.db.models.LiveSession.findByPk(due.sessionId);
    expect(seven.body.dueAt).toBe(session!.endedAt!.getTime() + 7 * 86_400_000);
    await set(later, 30);

    const retention = new RetentionService(t.cairn.ctx);
    const now = Date.now();
    expect(await retention.sweep(now)).toEqual([]);
    const swept = await retention.sweep(now + 8 * 86_400_000);
    expect(swept).toEqual([due.workshopId]);
    expect((await retention.status(due.workshopId)).held).toEqual({ names: 0, addresses: 0, photos: 0 });
    expect((await retention.status(later.workshopId)).held).toEqual({ names: 3, addresses: 1, photos: 3 });
    // Nothing left to delete: a later sweep leaves the workshop alone.
    expect(await retention.sweep(now + 9 * 86_400_000)).toEqual([]);
    expect(await retention.sweep(now + 31 * 86_400_000)).toEqual([later.workshopId]);
  });

  it('runs by itself on a timer that starts and stops', async () => {
    const { day } = await dayWithPersonalData('Harbour Lane: timer');
    await t.agent.post(`/api/workshops/${day.workshopId}/live/stop`).set('Authorization', bearer(day.ownerToken));
    await t.agent.put(`/api/workshops/${day.workshopId}/retention`).set('Authorization', bearer(day.ownerToken)).send({ retentionDays: 0 });
    const retention = new RetentionService(t.cairn.ctx);
    retention.start(50, 10);
    try {
      await expect.poll(async () => (await retention.status(day.workshopId)).held.names, { timeout: 5000 }).toBe(0);
    } finally {
      await retention.stop();
    }
  });
});

describe('what a participant does about their own data from the phone', () => {
  it('leaves an address for the report and takes it back', async () => {
    const day = await liveDay(t, { phones: [{ displayName: 'Dora Wilde' }], notes: [], stop: false });
    const token = day.phones[0]!.answer.token;
    const bad = await t.agent.put('/api/participant/report-email').set('Authorization', bearer(token)).send({ email: 'not an address' });
    expect(bad.status).toBe(400);
    const left = await t.agent.put('/api/participant/report-email').set('Authorization', bearer(token)).send({ email: 'dora@harbourlane.example' });
    expect(left.body.email).toBe('dora@harbourlane.example');
    expect((await results(day)).participation.withAddress).toBe(1);
    const back = await t.agent.put('/api/participant/report-email').set('Authorization', bearer(token)).send({ email: null });
    expect(back.body.email).toBeNull();
    expect((await results(day)).participation.withAddress).toBe(0);
  });

  it('removes their own notes, and only theirs', async () => {
    const day = await liveDay(t, {
      phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }],
      notes: [
        { type: 'insights', phone: 0, text: 'Mine, to be removed' },
        { type: 'insights', phone: 1, text: 'Ben keeps this one' },
        { type: 'insights', phone: 0, text: 'Also mine' },
      ],
    });
    const ana = day.phones[0]!.answer.token;
    expect((await t.agent.get('/api/participant/data').set('Authorization', bearer(ana))).body.notes).toBe(2);
    const res = await t.agent.delete('/api/participant/notes').set('Authorization', bearer(ana));
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ removed: 2, photos: 0 });
    const r = await results(day);
    expect(r.notes.map((n) => [n.text, n.author])).toEqual([['Ben keeps this one', 'Ben Okafor']]);
    expect((await t.agent.get('/api/participant/data').set('Authorization', bearer(ana))).body.notes).toBe(0);
  });
});
