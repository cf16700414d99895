import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PNG } from 'pngjs';
import { bearer, commandData, demoWorkshop, joinLive, startLive, startTestApp, type TestApp } from './helpers';
import { ACTIVITY_LIMITS } from '../../shared/schemas/activities';

let t: TestApp;
let sketchItemId: string;
let token: string;
let participantId: string;

/** A small PNG of one colour. */
function tinyPng(shade: number): Buffer {
  const png = new PNG({ width: 16, height: 12 });
  png.data.fill(shade);
  for (let i = 3; i < png.data.length; i += 4) png.data[i] = 255;
  return PNG.sync.write(png);
}

/** Uploads a sketch photo with a clientId. */
function upload(clientId: string, shade = 120) {
  return t.agent
    .post('/api/live/photos')
    .set('Authorization', bearer(token))
    .field('itemId', sketchItemId)
    .field('clientId', clientId)
    .field('caption', 'A dock map with the free docks in green')
    .field('showsPeople', 'false')
    .field('peopleConsent', 'false')
    .attach('photo', tinyPng(shade), { filename: 'sketch.png', contentType: 'image/png' });
}

beforeAll(async () => {
  t = await startTestApp();
  const owner = await t.tokenFor('facilitator');
  const demo = await demoWorkshop(t);
  const info = await startLive(t, owner, demo.id);
  const facilitator = await t.connect(owner);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  const items = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId: demo.id }, order: [['position', 'ASC']] });
  const index = items.findIndex((i) => i.type === 'sketch');
  sketchItemId = items[index]!.id;
  await commandData(facilitator, 'session:goto', { index });
  const joined = await joinLive(t, info.joinCode, { displayName: 'Ana Lindqvist' });
  token = joined.token;
  participantId = joined.me.id;
});
afterAll(() => t.close());

describe('one photo upload sent several times at once', () => {
  it('answers every copy with the one stored photo, never 500', async () => {
    const clientId = `race-${crypto.randomUUID()}`;
    const answers = await Promise.all(Array.from({ length: 8 }, () => upload(clientId)));
    for (const a of answers) expect([200, 201], JSON.stringify(a.body)).toContain(a.status);
    expect(new Set(answers.map((a) => a.body.photoId)).size).toBe(1);
    expect(new Set(answers.map((a) => a.body.submissionId)).size).toBe(1);
    expect(answers.filter((a) => a.body.duplicate === false)).toHaveLength(1);
    const { Photo, Submission } = t.cairn.ctx.db.models;
    expect(await Photo.count({ where: { participantId, clientId } })).toBe(1);
    expect(await Submission.count({ where: { participantId, clientId } })).toBe(1);
  });
});

describe('the photos-per-item limit', () => {
  it('holds under 40 simultaneous uploads from one person', async () => {
    const { Photo } = t.cairn.ctx.db.models;
    const before = await Photo.count({ where: { participantId, itemId: sketchItemId } });
    const answers = await Promise.all(Array.from({ length: 40 }, (_, i) => upload(`burst-${i}-${crypto.randomUUID()}`, i * 5)));
    const stored = await Photo.count({ where: { participantId, itemId: sketchItemId } });
    expect(stored).toBe(ACTIVITY_LIMITS.photosPerPersonPerItem);
    // A refused upload leaves no file behind: three files (full, thumbnail, blurred) a stored photo.
    const files = await fs.readdir(t.cairn.ctx.config.uploadDir);
    expect(files).toHaveLength(3 * (await Photo.count()));
    expect(answers.filter((a) => a.status === 201)).toHaveLength(ACTIVITY_LIMITS.photosPerPersonPerItem - before);
    for (const a of answers.filter((x) => x.status !== 201)) {
      expect(a.status).toBe(400);
      expect(a.body.error.message).toMatch(/the most one person can/);
    }
  });
});
