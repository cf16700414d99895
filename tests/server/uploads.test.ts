import fs from 'node:fs/promises';
import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { PNG } from 'pngjs';
import sharp from 'sharp';
import {
  bearer,
  command,
  commandData,
  createStranger,
  demoWorkshop,
  joinLive,
  startLive,
  startTestApp,
  type ClientSocket,
  type TestApp,
} from './helpers';
import type { LiveSessionInfo } from '../../shared/schemas/live';

let t: TestApp;
let info: LiveSessionInfo;
let workshopId: string;
let itemIds: string[];
let facilitatorToken: string;
let facilitator: ClientSocket;
let displayToken: string;
const people: { id: string; token: string; socket: ClientSocket }[] = [];

const SKETCH = 11;
const INSIGHTS = 5;

/** A PNG of 8-pixel black and white squares (a sharp pattern, so a blur shows). */
function checkerboard(width = 64, height = 48): Buffer {
  const png = new PNG({ width, height });
  for (let y = 0; y < height; y++) {
    for (let x = 0; x < width; x++) {
      const v = (Math.floor(x / 8) + Math.floor(y / 8)) % 2 ? 255 : 0;
      const i = (y * width + x) * 4;
      png.data[i] = png.data[i + 1] = png.data[i + 2] = v;
      png.data[i + 3] = 255;
    }
  }
  return PNG.sync.write(png);
}

/** CRC-32 of PNG chunks (PNG specification, Annex D "Sample CRC implementation"). */
function crc32(bytes: Buffer): number {
  let c = 0xffffffff;
  for (const b of bytes) {
    c ^= b;
    for (let k = 0; k < 8; k++) c = c & 1 ? 0xedb88320 ^ (c >>> 1) : c >>> 1;
  }
  return (c ^ 0xffffffff) >>> 0;
}

/** A small PNG whose header claims 60 000 × 60 000 pixels: a decompression bomb's shape, in a few bytes. */
function pixelBomb(): Buffer {
  const png = Buffer.from(PNG.sync.write(new PNG({ width: 1, height: 1 })));
  // IHDR starts at byte 8: length (4), type (4), width (4), height (4) … then its CRC over type and data.
  png.writeUInt32BE(60_000, 16);
  png.writeUInt32BE(60_000, 20);
  png.writeUInt32BE(crc32(png.subarray(12, 29)), 29);
  return png;
}

async function uploadsOnDisk(): Promise<string[]> {
  return fs.readdir(t.cairn.ctx.config.uploadDir).catch(() => []);
}

let clientIds = 0;
/** Uploads a photo as a participant; fields can be overridden or left out with `undefined`. */
function upload(who: number, file: Buffer | null, fields: Record<string, string | undefined> = {}, name = 'sketch.png') {
  clientIds += 1;
  const all: Record<string, string | undefined> = {
    itemId: itemIds[SKETCH],
    clientId: `upload-${clientIds}-${crypto.randomUUID().slice(0, 8)}`,
    caption: 'A dock map with the free docks in green',
    showsPeople: 'false',
    peopleConsent: 'false',
    ...fields,
  };
  let req = t.agent.post('/api/live/photos').set('Authorization', bearer(people[who]!.token));
  for (const [k, v] of Object.entries(all)) if (v !== undefined) req = req.field(k, v);
  if (file) req = req.attach('photo', file, { filename: name, contentType: 'image/png' });
  return req;
}

/** Pixel standard deviation of an image (how much sharp detail it keeps). */
async function spread(image: Buffer): Promise<number> {
  const stats = await sharp(image).greyscale().stats();
  return stats.channels[0]!.stdev;
}

beforeAll(async () => {
  t = await startTestApp();
  facilitatorToken = await t.tokenFor('facilitator');
  const demo = await demoWorkshop(t);
  workshopId = demo.id;
  itemIds = demo.itemIds;
  info = await startLive(t, facilitatorToken, demo.id);
  displayToken = new URL(info.displayUrl).searchParams.get('display')!;
  facilitator = await t.connect(facilitatorToken);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  for (const [displayName, photoConsent] of [['Ana Lindqvist', true], ['Ben Okafor', false], ['Cleo Marchetti', true]] as const) {
    const joined = await joinLive(t, info.joinCode, { displayName, photoConsent });
    const socket = await t.connect(joined.token);
    await commandData(socket, 'session:sync');
    people.push({ id: joined.me.id, token: joined.token, socket });
  }
  await commandData(facilitator, 'session:goto', { index: SKETCH });
});
afterAll(() => t.close());

describe('uploading a sketch photo', () => {
  let first: { submissionId: string; photoId: string };

  it('stores a PNG as a sketch with its caption, under random names in the upload folder, once per clientId', async () => {
    const res = await upload(0, checkerboard());
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    first = res.body;
    const files = await uploadsOnDisk();
    expect(files).toHaveLength(3);
    // Random names: nothing of the file's name, the person or the session.
    for (const f of files) expect(f).toMatch(/^[0-9a-f]{32}(\.thumb|\.blur)?\.jpg$/);
    const board = await commandData(facilitator, 'notes:list', { itemId: itemIds[SKETCH] });
    expect(board.notes).toMatchObject([{ kind: 'sketch', text: 'A dock map with the free docks in green', photo: { id: first.photoId, blurred: false } }]);
  });

  it('answers a retry with the first upload and stores nothing more', async () => {
    const row = await t.cairn.ctx.db.models.Photo.findByPk(first.photoId);
    const retry = await t.agent
      .post('/api/live/photos')
      .set('Authorization', bearer(people[0]!.token))
      .field('itemId', itemIds[SKETCH]!)
      .field('clientId', row!.clientId)
      .field('caption', 'Again')
      .field('showsPeople', 'false')
      .attach('photo', checkerboard(), 'again.png');
    expect(retry.status).toBe(200);
    expect(retry.body).toEqual({ ...first, duplicate: true });
    expect(await uploadsOnDisk()).toHaveLength(3);
  });

  it('takes JPEG and WebP, re-encoded without the camera’s metadata', async () => {
    const jpeg = await sharp(checkerboard()).jpeg().withExif({ IFD0: { Artist: 'Harbour Lane test camera' } }).toBuffer();
    expect((await sharp(jpeg).metadata()).exif).toBeDefined();
    const res = await upload(2, jpeg, {}, 'photo.jpg');
    expect(res.status, JSON.stringify(res.body)).toBe(201);
    const full = await t.agent.get(`/api/workshops/${workshopId}/photos/${res.body.photoId}?size=full`).set('Authorization', bearer(facilitatorToken));
    expect(full.status).toBe(200);
    expect(full.headers['content-type']).toBe('image/jpeg');
    expect((await sharp(full.body as Buffer).metadata()).exif).toBeUndefined();

    const webp = await sharp(checkerboard()).webp().toBuffer();
    expect((await upload(2, webp, {}, 'photo.webp')).status).toBe(201);
  });
});

describe('refusing bad uploads, leaving nothing behind', () => {
  async function expectNothingStored(run: () => Promise<{ status: number; body: { error?: { code: string; message: string } } }>, status: number, code: string, message: RegExp) {
    const before = { files: (await uploadsOnDisk()).length, photos: await t.cairn.ctx.db.models.Photo.count(), notes: await t.cairn.ctx.db.models.Submission.count() };
    const res = await run();
    expect(res.status, JSON.stringify(res.body)).toBe(status);
    expect(res.body.error?.code).toBe(code);
    expect(res.body.error?.message).toMatch(message);
    expect((await uploadsOnDisk()).length).toBe(before.files);
    expect(await t.cairn.ctx.db.models.Photo.count()).toBe(before.photos);
    expect(await t.cairn.ctx.db.models.Submission.count()).toBe(before.notes);
  }

  it('refuses a GIF, a PDF and a script named like a PNG, by their first bytes', async () => {
    // GIF89a (GIF specification), %PDF- (ISO 32000-1 §7.5.2): not formats Cairn takes.
    await expectNothingStored(() => upload(0, Buffer.from('GIF89a\x01\x00\x01\x00\x00\x00\x00;', 'latin1')), 415, 'unsupported_media', /PNG, JPEG or WebP/);
    await expectNothingStored(() => upload(0, Buffer.from('%PDF-1.7\n%âãÏÓ\n', 'latin1'), {}, 'sketch.png'), 415, 'unsupported_media', /PNG, JPEG or WebP/);
    await expectNothingStored(() => upload(0, Buffer.from('<script>alert(1)</script>'), {}, 'sketch.png'), 415, 'unsupported_media', /PNG, JPEG or WebP/);
  });

  it('refuses a file with a PNG signature that is not a picture', async () => {
    const fake = Buffer.concat([Buffer.from([0x89, 0x50, 0x4e, 0x47, 0x0d, 0x0a, 0x1a, 0x0a]), crypto.randomBytes(200)]);
    await expectNothingStored(() => upload(0, fake), 400, 'unsupported_media', /could not be read/);
  });

  it('refuses a file over 8 MB with a clear message', async () => {
    const big = Buffer.concat([checkerboard(), Buffer.alloc(8 * 1024 * 1024)]);
    await expectNothingStored(() => upload(0, big), 413, 'payload_too_large', /larger than 8 MB/);
  });

  it('refuses an image bomb by its declared pixels before decoding it', async () => {
    await expectNothingStored(() => upload(0, pixelBomb()), 413, 'payload_too_large', /too many pixels/);
  });

  it('refuses two files at once, no file, and a missing caption', async () => {
    await expectNothingStored(
      () =>
        t.agent
          .post('/api/live/photos')
          .set('Authorization', bearer(people[0]!.token))
          .field('itemId', itemIds[SKETCH]!)
          .field('clientId', 'two-files-0001')
          .field('caption', 'Two')
          .field('showsPeople', 'false')
          .attach('photo', checkerboard(), 'a.png')
          .attach('photo', checkerboard(), 'b.png'),
      400,
      'bad_request',
      /one photo at a time/,
    );
    await expectNothingStored(() => upload(0, null), 400, 'bad_request', /Choose a photo/);
    await expectNothingStored(() => upload(0, checkerboard(), { caption: '  ' }), 400, 'validation_failed', /fields that need fixing/);
  });

  it('refuses a photo to an activity that takes none, and anyone but a participant', async () => {
    await commandData(facilitator, 'session:goto', { index: INSIGHTS });
    await expectNothingStored(() => upload(0, checkerboard(), { itemId: itemIds[INSIGHTS] }), 400, 'bad_request', /does not take photos/);
    await commandData(facilitator, 'session:goto', { index: SKETCH });
    await expectNothingStored(() => t.agent.post('/api/live/photos').attach('photo', checkerboard(), 'a.png'), 401, 'unauthenticated', /Join the session/);
    await expectNothingStored(
      () => t.agent.post('/api/live/photos').set('Authorization', bearer(facilitatorToken)).attach('photo', checkerboard(), 'a.png'),
      401,
      'unauthenticated',
      /Join the session/,
    );
  });

  it('refuses photos while input is locked', async () => {
    await commandData(facilitator, 'session:lock', { locked: true });
    await expectNothingStored(() => upload(0, checkerboard()), 409, 'input_locked', /paused answers/);
    await commandData(facilitator, 'session:lock', { locked: false });
  });
});

describe('photos of people', () => {
  let cleared: string;
  let withoutConsent: string;

  beforeAll(async () => {
    // Ana has photo consent and says everyone in the picture agreed; Ben has not given photo consent.
    cleared = (await upload(0, checkerboard(), { showsPeople: 'true', peopleConsent: 'true', caption: 'Testing the prototype together' })).body.photoId;
    withoutConsent = (await upload(1, checkerboard(), { showsPeople: 'true', peopleConsent: 'true', caption: 'Us at the dock' })).body.photoId;
  });

  const asParticipant = (who: number, photoId: string, size = 'thumb') =>
    t.agent.get(`/api/live/photos/${photoId}?size=${size}`).set('Authorization', bearer(people[who]!.token)).buffer(true);

  it('shows a photo of people when everyone’s consent is on record', async () => {
    const res = await asParticipant(2, cleared);
    expect(res.status).toBe(200);
    expect(res.headers['x-cairn-blurred']).toBe('no');
    expect(res.headers['cache-control']).toBe('no-store');
    // Common practice for checking a blur: the sharp checkerboard keeps a wide spread of grey levels.
    expect(await spread(res.body as Buffer)).toBeGreaterThan(80);
  });

  it('blurs a photo of people whose uploader has no photo consent, for everyone but the uploader', async () => {
    const other = await asParticipant(0, withoutConsent, 'full');
    expect(other.headers['x-cairn-blurred']).toBe('yes');
    // A blurred copy has lost the squares: its grey levels are close together (common practice).
    expect(await spread(other.body as Buffer)).toBeLessThan(40);
    const projector = await t.agent.get(`/api/live/photos/${withoutConsent}`).set('Authorization', bearer(displayToken)).buffer(true);
    expect(projector.status).toBe(200);
    expect(projector.headers['x-cairn-blurred']).toBe('yes');
    const facilitatorView = await t.agent.get(`/api/workshops/${workshopId}/photos/${withoutConsent}`).set('Authorization', bearer(facilitatorToken));
    expect(facilitatorView.headers['x-cairn-blurred']).toBe('yes');
    const own = await asParticipant(1, withoutConsent);
    expect(own.headers['x-cairn-blurred']).toBe('no');

    const projectorSocket = await t.connect(displayToken);
    const board = await commandData(projectorSocket, 'activity:board', { itemId: itemIds[SKETCH] });
    expect(board.notes.find((n) => n.photo?.id === withoutConsent)?.photo?.blurred).toBe(true);
    expect(board.notes.find((n) => n.photo?.id === cleared)?.photo?.blurred).toBe(false);
  });

  it('blurs again when the uploader withdraws consent', async () => {
    await commandData(people[0]!.socket, 'participant:consent', { photoConsent: false });
    expect((await asParticipant(2, cleared)).headers['x-cairn-blurred']).toBe('yes');
    await commandData(people[0]!.socket, 'participant:consent', { photoConsent: true });
    expect((await asParticipant(2, cleared)).headers['x-cairn-blurred']).toBe('no');
  });

  it('serves hidden photos to the facilitators only', async () => {
    const note = (await commandData(facilitator, 'notes:list', { itemId: itemIds[SKETCH] })).notes.find((n) => n.photo?.id === cleared)!;
    await commandData(facilitator, 'notes:hide', { noteIds: [note.id], hidden: true });
    expect((await asParticipant(2, cleared)).status).toBe(404);
    expect((await t.agent.get(`/api/live/photos/${cleared}`).set('Authorization', bearer(displayToken))).status).toBe(404);
    expect((await t.agent.get(`/api/workshops/${workshopId}/photos/${cleared}`).set('Authorization', bearer(facilitatorToken))).status).toBe(200);
    await commandData(facilitator, 'notes:hide', { noteIds: [note.id], hidden: false });
  });
});

describe('who reads photos', () => {
  let photoId: string;
  beforeAll(async () => {
    photoId = (await t.cairn.ctx.db.models.Photo.findOne({ where: { showsPeople: false } }))!.id;
  });

  it('lets observers read through the workshop, and refuses strangers', async () => {
    const observer = await t.agent.get(`/api/workshops/${workshopId}/photos/${photoId}`).set('Authorization', bearer(await t.tokenFor('observer')));
    expect(observer.status).toBe(200);
    const stranger = await createStranger(t);
    const refused = await t.agent.get(`/api/workshops/${workshopId}/photos/${photoId}`).set('Authorization', bearer(stranger.token));
    expect(refused.status).toBe(403);
    expect((await t.agent.get(`/api/live/photos/${photoId}`)).status).toBe(401);
  });

  it('keeps photos within their session: another session’s phone and projector get nothing', async () => {
    const other = await t.agent
      .post('/api/workshops')
      .set('Authorization', bearer(facilitatorToken))
      .send({ title: 'Another ride', objective: 'A second session', date: '2027-05-01', headcount: 6, templateId: 'half-day' });
    const otherLive = await startLive(t, facilitatorToken, other.body.id);
    const stranger = await joinLive(t, otherLive.joinCode, { displayName: 'Gus Ferreira' });
    expect((await t.agent.get(`/api/live/photos/${photoId}`).set('Authorization', bearer(stranger.token))).status).toBe(404);
    const otherDisplay = new URL(otherLive.displayUrl).searchParams.get('display')!;
    expect((await t.agent.get(`/api/live/photos/${photoId}`).set('Authorization', bearer(otherDisplay))).status).toBe(404);
    expect((await t.agent.get(`/api/workshops/${other.body.id}/photos/${photoId}`).set('Authorization', bearer(facilitatorToken))).status).toBe(404);
  });

  it('never serves the upload folder as files', async () => {
    const [file] = await uploadsOnDisk();
    for (const path of [`/uploads/${file}`, `/data/uploads/${file}`, `/api/uploads/${file}`]) {
      const res = await t.agent.get(path);
      expect(res.headers['content-type'] ?? '').not.toMatch(/image/);
    }
  });
});

describe('feedback on sketches and the count limit', () => {
  it('takes feedback on someone else’s sketch, not on one’s own', async () => {
    const itemId = itemIds[SKETCH]!;
    const sketch = (await commandData(facilitator, 'notes:list', { itemId })).notes.find((n) => n.kind === 'sketch' && n.participantId === people[0]!.id)!;
    const given = await command(people[2]!.socket, 'submission:create', { clientId: 'sketch-feedback-1', itemId, kind: 'feedback', text: 'Green for free docks is clear', fields: { sketchId: sketch.id } });
    expect(given).toMatchObject({ data: { duplicate: false } });
    const own = await command(people[0]!.socket, 'submission:create', { clientId: 'sketch-feedback-2', itemId, kind: 'feedback', text: 'Mine is great', fields: { sketchId: sketch.id } });
    expect(own).toMatchObject({ error: { code: 'bad_request' } });
    const board = await commandData(people[0]!.socket, 'activity:board', { itemId });
    expect(board.notes.filter((n) => n.kind === 'feedback').map((n) => n.text)).toEqual(['Green for free docks is clear']);
    // A photo cannot be claimed by a note made by hand.
    const claim = await command(people[2]!.socket, 'submission:create', { clientId: 'claim-0001', itemId, kind: 'sketch', text: 'Mine now', fields: { photoId: sketch.photo!.id } });
    expect(claim).toMatchObject({ error: { code: 'bad_request' } });
  });

  it('takes at most 30 photos from one person in one activity', async () => {
    const small = checkerboard(8, 8);
    const already = await t.cairn.ctx.db.models.Photo.count({ where: { participantId: people[2]!.id } });
    for (let i = already; i < 30; i++) expect((await upload(2, small)).status).toBe(201);
    const files = (await uploadsOnDisk()).length;
    const over = await upload(2, small);
    expect(over.status).toBe(400);
    expect(over.body.error.message).toMatch(/the most one person can/);
    expect((await uploadsOnDisk()).length).toBe(files);
  });
});

describe('deleting the workshop', () => {
  // Last in this file: it removes the demo workshop the other tests use.
  it('removes the photo files from disk along with their rows', async () => {
    const ok = await upload(0, checkerboard());
    expect(ok.status).toBe(201);
    expect((await uploadsOnDisk()).length).toBeGreaterThan(0);
    await t.agent.post(`/api/workshops/${workshopId}/live/stop`).set('Authorization', bearer(facilitatorToken));
    const res = await t.agent.delete(`/api/workshops/${workshopId}`).set('Authorization', bearer(facilitatorToken));
    expect(res.status).toBe(204);
    expect(await uploadsOnDisk()).toEqual([]);
    expect(await t.cairn.ctx.db.models.Photo.count()).toBe(0);
  });
});
