import fs from 'node:fs/promises';
import os from 'node:os';
import path from 'node:path';
import zlib from 'node:zlib';
import express from 'express';
import supertest from 'supertest';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import crypto from 'node:crypto';
import { builtInlineScriptSources, cacheControlOf, hashedAssets, inlineScriptSources, serveClient, shellFor } from '../../server/common/client-assets';
import { startTestApp, type TestApp } from './helpers';

const SHELL = '<!doctype html><title>Cairn</title><div id="app"></div>' + ' '.repeat(600);
const PAINTER = '(function(){document.title="painted"})()';
const PHONE_SHELL = SHELL.replace('</title>', '</title><link rel="modulepreload" href="/assets/phone-Xy.js">').replace('</div>', `</div><script>${PAINTER}</script>`);
const SCRIPT = `console.log(${JSON.stringify('a phone script '.repeat(100))});`;
let dist: string;
let agent: supertest.Agent;

beforeAll(async () => {
  // A built client as vite-plugin-compression2 leaves it: each file with its .br and .gz beside it.
  dist = await fs.mkdtemp(path.join(os.tmpdir(), 'cairn-dist-'));
  await fs.mkdir(path.join(dist, 'assets'));
  await fs.mkdir(path.join(dist, 'route-shells'));
  // The phone page's own shell; this build has none for /join, which then gets index.html.
  for (const [name, text] of [['index.html', SHELL], ['assets/index-AbC123.js', SCRIPT], ['route-shells/phone.html', PHONE_SHELL]] as const) {
    await fs.writeFile(path.join(dist, name), text);
    await fs.writeFile(path.join(dist, `${name}.br`), zlib.brotliCompressSync(text));
    await fs.writeFile(path.join(dist, `${name}.gz`), zlib.gzipSync(text));
  }
  const app = express();
  app.use(hashedAssets(dist));
  app.get('/api/ping', (_req, res) => res.json({ ok: true }));
  serveClient(app, dist);
  agent = supertest.agent(app);
});
afterAll(() => fs.rm(dist, { recursive: true, force: true }));

describe('the built client', () => {
  it('sends the brotli copy to a browser that accepts it, gzip to one that takes only gzip, and the file itself otherwise', async () => {
    const br = await agent.get('/assets/index-AbC123.js').set('Accept-Encoding', 'gzip, deflate, br');
    expect(br.headers['content-encoding']).toBe('br');
    // The file the build compressed, sent as it is (supertest decodes it again).
    expect(Number(br.headers['content-length'])).toBe(zlib.brotliCompressSync(SCRIPT).length);
    expect(br.text).toBe(SCRIPT);
    expect(br.headers['content-type']).toMatch(/javascript/);
    const gz = await agent.get('/assets/index-AbC123.js').set('Accept-Encoding', 'gzip');
    expect(gz.headers['content-encoding']).toBe('gzip');
    const plain = await agent.get('/assets/index-AbC123.js').set('Accept-Encoding', 'identity');
    expect(plain.headers['content-encoding']).toBeUndefined();
    expect(plain.text).toBe(SCRIPT);
  });

  it('keeps hashed assets a year as immutable and makes the shell revalidate', async () => {
    // RFC 8246 (immutable); RFC 9111 §5.2.2.4 (no-cache: use only after revalidating).
    const asset = await agent.get('/assets/index-AbC123.js');
    expect(asset.headers['cache-control']).toBe('public, max-age=31536000, immutable');
    expect(asset.headers['x-content-type-options']).toBe('nosniff');
    const shell = await agent.get('/join/ABC123').set('Accept-Encoding', 'br');
    expect(shell.status).toBe(200);
    expect(shell.headers['content-encoding']).toBe('br');
    expect(shell.headers['cache-control']).toBe('no-cache');
    expect(cacheControlOf('sw.js')).toBe('no-cache');
  });

  it("sends the phone page its own shell, and index.html to every other path and to a route whose shell was not built", async () => {
    for (const url of ['/phone/5b0c', '/phone/5b0c/', '/phone/5b0c?here=1']) expect((await agent.get(url)).text, url).toBe(PHONE_SHELL);
    for (const url of ['/phone/5b0c/my-data', '/join/ABC123', '/join', '/workshops', '/']) expect((await agent.get(url)).text, url).toBe(SHELL);
    const br = await agent.get('/phone/5b0c').set('Accept-Encoding', 'br');
    expect(br.headers['content-encoding']).toBe('br');
    expect(br.headers['cache-control']).toBe('no-cache');
    expect(shellFor('/join/ABC123', ['route-shells/join.html'])).toBe('/route-shells/join.html');
    expect(shellFor('/join', ['route-shells/join.html'])).toBe('/route-shells/join.html');
    expect(shellFor('/joined', ['route-shells/join.html'])).toBe('/index.html');
  });

  it('leaves the API, socket.io and missing assets alone instead of answering them with the shell', async () => {
    expect((await agent.get('/api/ping')).body).toEqual({ ok: true });
    expect((await agent.get('/api/nothing-here')).status).toBe(404);
    expect((await agent.get('/socket.io/?EIO=4')).status).toBe(404);
    expect((await agent.get('/assets/index-Old999.js')).status).toBe(404);
  });
});

describe("the shells' inline script", () => {
  it('is allowed by its SHA-256 in the Content-Security-Policy, and no script with a src is hashed', () => {
    // CSP Level 3, "Does element match source list for type and source?": a hash-source is the base64 of the
    // digest of the script element's text, UTF-8 encoded.
    const expected = `'sha256-${crypto.createHash('sha256').update(PAINTER).digest('base64')}'`;
    expect(inlineScriptSources(PHONE_SHELL)).toEqual([expected]);
    expect(inlineScriptSources('<script type="module" src="/assets/index-AbC123.js"></script>', SHELL)).toEqual([]);
    // The same script in two shells is one source.
    expect(builtInlineScriptSources(dist)).toEqual([expected]);
  });

  it("is the only thing of a phone page's HTML that varies with the build: every session and every visitor get the same file, with nothing of a session in it", async () => {
    const a = await agent.get('/phone/3f2a9c0e-0000-4000-8000-000000000001').set('Accept-Encoding', 'identity');
    const b = await agent.get('/phone/another-session').set('Accept-Encoding', 'identity').set('Cookie', 'cairn=anything');
    expect(a.text).toBe(PHONE_SHELL);
    expect(b.text).toBe(PHONE_SHELL);
  });
});

describe('dynamic answers', () => {
  let t: TestApp;
  beforeAll(async () => {
    t = await startTestApp();
  });
  afterAll(() => t.close());

  it('compresses a JSON answer when the caller accepts gzip', async () => {
    const res = await t.agent.get('/api/openapi.json').set('Accept-Encoding', 'gzip');
    expect(res.status).toBe(200);
    expect(res.headers['content-encoding']).toBe('gzip');
    expect(res.body.openapi).toBeDefined();
  });
});
