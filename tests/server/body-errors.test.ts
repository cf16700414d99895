import zlib from 'node:zlib';
import express from 'express';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it, vi } from 'vitest';
import { errorHandler } from '../../server/common/errors';
import { startTestApp, type TestApp } from './helpers';

let t: TestApp;
beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t.close());

/** A JSON body that is not valid gzip, and one cut off half way. */
const notGzip = Buffer.from('this is not gzip at all');
const cutGzip = zlib.gzipSync(JSON.stringify({ email: 'mira@harbourlane.example', password: 'x' })).subarray(0, 20);

describe('a request body the server cannot read', () => {
  it('is answered as body-parser says (415 for an unknown encoding or charset, 400 for broken gzip), never 500', async () => {
    // The bytes go as they are (superagent would otherwise serialise a Buffer as JSON).
    const post = () =>
      t.agent
        .post('/api/auth/sign-in')
        .set('Content-Type', 'application/json')
        .serialize((b: unknown) => b as string);
    const unknown = await post().set('Content-Encoding', 'x-cairn-unknown').send('{}');
    expect(unknown.status).toBe(415);
    expect(unknown.body.error).toEqual({ code: 'unsupported_media', message: expect.stringMatching(/content encoding/) });
    const charset = await t.agent.post('/api/auth/sign-in').set('Content-Type', 'application/json; charset=x-cairn').send('{}');
    expect(charset.status).toBe(415);
    for (const body of [notGzip, cutGzip]) {
      const broken = await post().set('Content-Encoding', 'gzip').send(body);
      expect(broken.status).toBe(400);
      expect(broken.body.error.code).toBe('bad_request');
    }
    // A well-formed gzip body still reads (RFC 9110 §8.4.1.3 gzip coding).
    const fine = await post()
      .set('Content-Encoding', 'gzip')
      .send(zlib.gzipSync(JSON.stringify({ email: 'mira@harbourlane.example', password: 'demo-facilitator-2026' })));
    expect(fine.status).toBe(200);
  });

  it('is logged below error level, while a real failure still logs an error', async () => {
    const log = { info: vi.fn(), error: vi.fn() };
    const app = express();
    app.use((req, _res, next) => {
      (req as unknown as { log: typeof log }).log = log;
      next();
    });
    app.use(express.json());
    app.post('/boom', () => {
      throw new Error('a bug');
    });
    app.post('/echo', (_req, res) => res.json({}));
    app.use(errorHandler);
    const agent = {
      post: (url: string) =>
        supertest(app)
          .post(url)
          .serialize((b: unknown) => b as string),
    };
    expect((await agent.post('/echo').set('Content-Type', 'application/json').set('Content-Encoding', 'gzip').send(notGzip)).status).toBe(400);
    expect((await agent.post('/echo').set('Content-Type', 'application/json').set('Content-Encoding', 'x-cairn-unknown').send('{}')).status).toBe(415);
    expect(log.error).not.toHaveBeenCalled();
    expect(log.info).toHaveBeenCalledTimes(2);
    expect((await agent.post('/boom').send('{}')).status).toBe(500);
    expect(log.error).toHaveBeenCalledTimes(1);
  });
});
