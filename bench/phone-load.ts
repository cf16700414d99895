/**
 * `npm run bench:phone`: what a participant's phone downloads and waits for. Starts Cairn on a fresh
 * data folder with the built client (`npm run build` first), joins the demo's live session, then loads
 * `/join` and a joined phone page in Debian's Chromium under a phone's conditions (4× slower CPU,
 * 1.6 Mbps down, 150 ms round trip: Lighthouse's mobile preset), sums the bytes that crossed the wire
 * by kind, reads the first contentful paint, and runs Lighthouse (`--no-lighthouse` skips it). Prints a
 * table against the targets and writes JSON (`--json FILE`, default bench/results/phone-load.json).
 * The joined phone holds what a phone that follows the session holds: its token and what the page keeps of
 * the last screen it showed (src/stores/live.ts and src/boot/first-screen.ts), read from the page once shown;
 * `--no-last-seen` loads it with the token only, as if the phone had never shown a screen.
 */
import { CHROMIUM_FLAGS } from '../e2e/chromium';
import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import type { AddressInfo } from 'node:net';
import { chromium, type Browser } from '@playwright/test';
import lighthouse from 'lighthouse';
import * as chromeLauncher from 'chrome-launcher';
import { io as ioClient } from 'socket.io-client';
import { createApp } from '../server/app';
import { loadConfig } from '../server/config/env';
import { DEMO_ACCOUNTS, DEMO_WORKSHOP_TITLE } from '../server/db/seed';

const args = process.argv.slice(2);
const arg = (name: string, fallback: string) => {
  const i = args.indexOf(`--${name}`);
  return i >= 0 && args[i + 1] ? args[i + 1]! : fallback;
};
const JSON_FILE = arg('json', path.join('bench', 'results', 'phone-load.json'));
const RUNS = Number(arg('runs', '3'));
const WITH_LIGHTHOUSE = !args.includes('--no-lighthouse');
const WITH_LAST_SEEN = !args.includes('--no-last-seen');
/** `--lhr DIR`: also keep each route's whole Lighthouse report there (what ran on the main thread, the request chains). */
const LHR_DIR = arg('lhr', '');
const CHROME = process.env.CHROME_PATH ?? '/usr/bin/chromium';
/** Lighthouse's mobile preset (lighthouse core/config/constants.js, `throttling.mobileSlow4G`): 150 ms, 1,638.4 kbit/s, 4× CPU. */
const PHONE = { rttMs: 150, downKbps: 1638.4, upKbps: 750, cpuSlowdown: 4 };
/** The issue's targets for each phone route. */
const TARGETS = { jsKB: 150, totalKB: 250, fcpMs: 2000, performance: 0.95, accessibility: 1, bestPractices: 1 };

interface Load {
  requests: number;
  totalKB: number;
  jsKB: number;
  cssKB: number;
  fontKB: number;
  otherKB: number;
  fcpMs: number;
  urls: string[];
}

async function api<T>(base: string, method: string, url: string, body?: unknown, token?: string): Promise<T> {
  const res = await fetch(`${base}/api${url}`, {
    method,
    headers: { 'Content-Type': 'application/json', ...(token ? { Authorization: `Bearer ${token}` } : {}) },
    body: body === undefined ? undefined : JSON.stringify(body),
  });
  if (!res.ok) throw new Error(`${method} ${url}: ${res.status} ${await res.text()}`);
  return (await res.json()) as T;
}

/** Loads `url` in a fresh phone-sized context under the phone's conditions and sums what crossed the wire. */
async function loadOnce(browser: Browser, url: string, ready: string, storage: Record<string, string>): Promise<Load> {
  const context = await browser.newContext({ viewport: { width: 412, height: 823 }, isMobile: true, hasTouch: true, deviceScaleFactor: 1.75 });
  await context.addInitScript((items: Record<string, string>) => {
    for (const [k, v] of Object.entries(items)) localStorage.setItem(k, v);
  }, storage);
  const page = await context.newPage();
  const cdp = await context.newCDPSession(page);
  await cdp.send('Network.enable');
  await cdp.send('Network.setCacheDisabled', { cacheDisabled: true });
  await cdp.send('Network.emulateNetworkConditions', {
    offline: false,
    latency: PHONE.rttMs,
    downloadThroughput: (PHONE.downKbps * 1024) / 8,
    uploadThroughput: (PHONE.upKbps * 1024) / 8,
  });
  await cdp.send('Emulation.setCPUThrottlingRate', { rate: PHONE.cpuSlowdown });
  const kinds = new Map<string, { type: string; url: string }>();
  const bytes = new Map<string, number>();
  cdp.on('Network.responseReceived', (e) => kinds.set(e.requestId, { type: e.type, url: e.response.url }));
  cdp.on('Network.loadingFinished', (e) => bytes.set(e.requestId, e.encodedDataLength));
  await page.goto(url, { waitUntil: 'load' });
  await page.locator(ready).first().waitFor({ timeout: 60_000 });
  // Lazy chunks and the socket's first exchanges settle after the page shows.
  await page.waitForTimeout(3000);
  const fcpMs = await page.evaluate(() => performance.getEntriesByName('first-contentful-paint')[0]?.startTime ?? NaN);
  await context.close();
  const load: Load = { requests: 0, totalKB: 0, jsKB: 0, cssKB: 0, fontKB: 0, otherKB: 0, fcpMs, urls: [] };
  for (const [id, n] of bytes) {
    const kind = kinds.get(id);
    const kb = n / 1024;
    load.requests++;
    load.totalKB += kb;
    if (kind?.type === 'Script') load.jsKB += kb;
    else if (kind?.type === 'Stylesheet') load.cssKB += kb;
    else if (kind?.type === 'Font') load.fontKB += kb;
    else load.otherKB += kb;
    load.urls.push(`${kind?.type ?? '?'} ${(kb).toFixed(1)} kB ${kind?.url.replace(/^https?:\/\/[^/]+/, '') ?? id}`);
  }
  return load;
}

/** The phone page's storage once it has shown the current item: its token plus what it keeps for the next load. */
async function keptByPage(browser: Browser, url: string, storage: Record<string, string>, sessionId: string): Promise<Record<string, string>> {
  const context = await browser.newContext({ viewport: { width: 412, height: 823 }, isMobile: true, serviceWorkers: 'block' });
  await context.addInitScript((items: Record<string, string>) => {
    for (const [k, v] of Object.entries(items)) localStorage.setItem(k, v);
  }, storage);
  const page = await context.newPage();
  await page.goto(url);
  await page.locator('[data-test=connection]', { hasText: /./ }).waitFor();
  // Kept once the socket's sync has brought the current item (and the participant's name, a moment later).
  await page.waitForFunction((id) => localStorage.getItem(`cairn.last.${id}`) !== null, sessionId, { timeout: 30_000 });
  await page.waitForTimeout(1500);
  const kept = await page.evaluate(() => Object.fromEntries(Object.keys(localStorage).filter((k) => k.startsWith('cairn.')).map((k) => [k, localStorage.getItem(k)!])));
  await context.close();
  return kept;
}

/** The largest contentful paint's element and phases, as Lighthouse's `largest-contentful-paint-element` audit gives them. */
function lcpElementOf(details: unknown): string {
  const tables = (details as { items?: { items?: Record<string, unknown>[] }[] } | undefined)?.items ?? [];
  const node = tables[0]?.items?.[0]?.node as { snippet?: string } | undefined;
  const phases = (tables[1]?.items ?? []).map((p) => `${String(p.phase)} ${Math.round(Number(p.timing))} ms`);
  return [node?.snippet ?? '?', ...phases].join('; ');
}

/** Lighthouse's mobile run on `url` (its default config), with `storage` put in localStorage first. */
async function audit(url: string, storage: Record<string, string>, name: string) {
  const chrome = await chromeLauncher.launch({ chromePath: CHROME, chromeFlags: CHROMIUM_FLAGS });
  try {
    // Lighthouse resets storage before it loads a page; the joined phone needs its token, so the
    // storage is set here and only the cache and service worker are cleared.
    const browser = await chromium.connectOverCDP(`http://127.0.0.1:${chrome.port}`);
    const page = await browser.contexts()[0]!.newPage();
    await page.goto(new URL('/favicon.svg', url).href);
    await page.evaluate((items: Record<string, string>) => {
      for (const [k, v] of Object.entries(items)) localStorage.setItem(k, v);
    }, storage);
    const cdp = await page.context().newCDPSession(page);
    await cdp.send('Network.clearBrowserCache');
    await cdp.send('Storage.clearDataForOrigin', { origin: new URL(url).origin, storageTypes: 'service_workers,cache_storage' });
    await page.close();
    await browser.close();
    const result = await lighthouse(url, {
      port: chrome.port,
      output: 'json',
      logLevel: 'error',
      disableStorageReset: true,
      onlyCategories: ['performance', 'accessibility', 'best-practices'],
    });
    const lhr = result!.lhr;
    if (LHR_DIR) {
      fs.mkdirSync(LHR_DIR, { recursive: true });
      fs.writeFileSync(path.join(LHR_DIR, `${name.replace(/[^a-z0-9]+/gi, '-').replace(/^-|-$/g, '')}.json`), JSON.stringify(lhr));
    }
    const failing = (cat: string) =>
      lhr.categories[cat]!.auditRefs
        .filter((r) => r.weight > 0 && (lhr.audits[r.id]!.score ?? 1) < 1)
        .map((r) => `${r.id} ${lhr.audits[r.id]!.score}`);
    return {
      performance: lhr.categories.performance!.score ?? 0,
      accessibility: lhr.categories.accessibility!.score ?? 0,
      bestPractices: lhr.categories['best-practices']!.score ?? 0,
      fcpMs: lhr.audits['first-contentful-paint']!.numericValue ?? NaN,
      lcpMs: lhr.audits['largest-contentful-paint']!.numericValue ?? NaN,
      tbtMs: lhr.audits['total-blocking-time']!.numericValue ?? NaN,
      // Which element Lighthouse took as the largest paint, and when its phases ended (time to first byte, load delay, load, render delay).
      lcpElement: lcpElementOf(lhr.audits['largest-contentful-paint-element']?.details),
      failing: [...failing('performance'), ...failing('accessibility'), ...failing('best-practices')],
      // What a failing best-practices or accessibility audit found, so a point lost says where.
      findings: [...failing('accessibility'), ...failing('best-practices')].map((f) => {
        const id = f.split(' ')[0]!;
        const items = (lhr.audits[id]!.details as { items?: unknown[] } | undefined)?.items ?? [];
        return `${id}: ${JSON.stringify(items).slice(0, 600)}`;
      }),
      problem: lhr.runtimeError?.message ?? null,
    };
  } finally {
    chrome.kill();
  }
}

const median = (xs: number[]) => [...xs].sort((a, b) => a - b)[Math.floor(xs.length / 2)]!;
const r1 = (n: number) => Math.round(n * 10) / 10;

async function main(): Promise<void> {
  if (!fs.existsSync(path.join('dist', 'index.html'))) throw new Error('build the client first: npm run build');
  const dataDir = fs.mkdtempSync(path.join(os.tmpdir(), 'cairn-phone-load-'));
  const cairn = await createApp(loadConfig({ ...process.env, NODE_ENV: 'production', DATA_DIR: dataDir, LOG_LEVEL: 'warn', PORT: '0' }));
  await new Promise<void>((resolve) => cairn.server.listen(Number(arg('port', '0')), '127.0.0.1', resolve));
  const base = `http://127.0.0.1:${(cairn.server.address() as AddressInfo).port}`;
  try {
    const { accessToken } = await api<{ accessToken: string }>(base, 'POST', '/auth/sign-in', DEMO_ACCOUNTS.facilitator);
    const demo = (await api<{ id: string; title: string }[]>(base, 'GET', '/workshops', undefined, accessToken)).find(
      (w) => w.title === DEMO_WORKSHOP_TITLE,
    )!;
    const info = await api<{ sessionId: string; joinCode: string }>(base, 'POST', `/workshops/${demo.id}/live`, {}, accessToken);
    const joined = await api<{ token: string; sessionId: string }>(base, 'POST', `/join/${info.joinCode}`, {
      displayName: 'Ines',
      photoConsent: true,
      deviceId: `phone-load-${Date.now()}`,
    });
    const phoneStorage = { [`cairn.participant.${joined.sessionId}`]: joined.token };
    // The dot vote: the activity whose phone screen once brought the chart library along.
    const agenda = (await api<{ agenda: { type: string }[] }>(base, 'GET', `/workshops/${demo.id}`, undefined, accessToken)).agenda;
    const facilitator = ioClient(base, { auth: { token: accessToken }, transports: ['websocket'] });
    await facilitator.timeout(10_000).emitWithAck('session:watch', { sessionId: info.sessionId });
    const goto = (index: number) => facilitator.timeout(10_000).emitWithAck('session:goto', { index });

    const routes: { name: string; url: string; ready: string; storage: Record<string, string>; index?: number }[] = [
      { name: '/join', url: `${base}/join`, ready: '[data-test=join-code]', storage: {} },
      { name: '/join/<code>', url: `${base}/join/${info.joinCode}`, ready: '[data-test=display-name]', storage: {} },
      { name: 'phone (welcome)', url: `${base}/phone/${joined.sessionId}`, ready: '[data-test=phone-activity]', storage: phoneStorage, index: 0 },
      {
        name: 'phone (dot vote)',
        url: `${base}/phone/${joined.sessionId}`,
        ready: '[data-test=vote-phone]',
        storage: phoneStorage,
        index: agenda.findIndex((i) => i.type === 'dot_vote'),
      },
    ];
    const browser = await chromium.launch({ executablePath: CHROME, args: CHROMIUM_FLAGS });
    const rows: Record<string, unknown>[] = [];
    // `--only TEXT`: just the routes whose name holds it (e.g. `--only welcome`).
    const only = arg('only', '');
    for (const route of routes.filter((r) => r.name.includes(only))) {
      if (route.index !== undefined) await goto(route.index);
      if (route.index !== undefined && WITH_LAST_SEEN) {
        // What the phone's page keeps once it has shown this item (its last state under `cairn.last.<session>`,
        // its first screen under `cairn.screen.<session>`): read from the page itself, shown once at full speed.
        route.storage = await keptByPage(browser, route.url, route.storage, joined.sessionId);
      }
      const loads: Load[] = [];
      for (let i = 0; i < RUNS; i++) loads.push(await loadOnce(browser, route.url, route.ready, route.storage));
      const last = loads[loads.length - 1]!;
      const lh = WITH_LIGHTHOUSE && (route.name === '/join' || route.name === 'phone (welcome)' || route.name === 'phone (dot vote)')
        ? await audit(route.url, route.storage, route.name)
        : null;
      const row = {
        route: route.name,
        requests: last.requests,
        jsKB: r1(last.jsKB),
        cssKB: r1(last.cssKB),
        fontKB: r1(last.fontKB),
        otherKB: r1(last.otherKB),
        totalKB: r1(last.totalKB),
        fcpMs: Math.round(median(loads.map((l) => l.fcpMs))),
        lighthouse: lh,
        files: last.urls,
      };
      rows.push(row);
      console.log(
        `${route.name.padEnd(18)} ${String(row.requests).padStart(3)} requests  JS ${String(row.jsKB).padStart(6)} kB  CSS ${String(row.cssKB).padStart(5)} kB  fonts ${String(row.fontKB).padStart(5)} kB  other ${String(row.otherKB).padStart(5)} kB  total ${String(row.totalKB).padStart(6)} kB  FCP ${row.fcpMs} ms (median of ${RUNS})` +
          (lh
            ? `\n${''.padEnd(18)} Lighthouse performance ${lh.performance} accessibility ${lh.accessibility} best practices ${lh.bestPractices} (FCP ${Math.round(lh.fcpMs)} ms, LCP ${Math.round(lh.lcpMs)} ms, TBT ${Math.round(lh.tbtMs)} ms)\n${''.padEnd(18)} LCP element: ${lh.lcpElement}${lh.failing.length ? `\n${''.padEnd(18)} below 1: ${lh.failing.join(', ')}` : ''}${lh.findings.map((f) => `\n${''.padEnd(18)} ${f}`).join('')}${lh.problem ? `\n${''.padEnd(18)} Lighthouse could not finish: ${lh.problem}` : ''}`
            : ''),
      );
    }
    console.log(WITH_LAST_SEEN ? 'the joined phone held its last screen (as after a reload)' : 'the joined phone held its token only (--no-last-seen)');
    console.log(
      `targets: JS ≤ ${TARGETS.jsKB} kB and total ≤ ${TARGETS.totalKB} kB compressed per route, FCP ≤ ${TARGETS.fcpMs} ms on /join, Lighthouse performance ≥ ${TARGETS.performance}, accessibility ${TARGETS.accessibility}, best practices ${TARGETS.bestPractices}`,
    );
    await browser.close();
    facilitator.disconnect();
    fs.mkdirSync(path.dirname(JSON_FILE), { recursive: true });
    fs.writeFileSync(JSON_FILE, JSON.stringify({ at: new Date().toISOString(), conditions: PHONE, targets: TARGETS, routes: rows }, null, 2));
  } finally {
    await cairn.close();
    fs.rmSync(dataDir, { recursive: true, force: true });
  }
}

main().catch((err) => {
  console.error(err);
  process.exit(1);
});
