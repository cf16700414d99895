import fs from 'node:fs';
import os from 'node:os';
import path from 'node:path';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { bearer, liveDay, startTestApp, type TestApp } from './helpers';
import { isCalendarDate } from '../../shared/schemas/workshop';
import { toCsv } from '../../server/features/results/export.service';

// Regression tests for what an outside security probe of a demo server found (issue 14): each check
// failed before its fix.

let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t?.close());

describe('workshop dates (probe item 19)', () => {
  it('refuses days that do not exist, and takes 29 February only in a leap year', async () => {
    // Gregorian leap years (ISO 8601 uses the Gregorian calendar): every 4th year, not centuries, but every 400th.
    expect(['2027-03-14', '2028-02-29', '2000-02-29', '2027-12-31', '2027-04-30'].map(isCalendarDate)).toEqual([true, true, true, true, true]);
    expect(['2027-13-45', '2027-02-30', '2027-02-29', '1900-02-29', '2027-04-31', '2027-00-10', '2027-01-00'].map(isCalendarDate)).toEqual(
      Array(7).fill(false),
    );
    const owner = await t.tokenFor('facilitator');
    for (const date of ['2027-13-45', '2027-02-30']) {
      const made = await t.agent.post('/api/workshops').set('Authorization', bearer(owner)).send({ title: 'Harbour Lane: dates', objective: 'Check dates', date, headcount: 12 });
      expect(made.status, date).toBe(400);
      expect(JSON.stringify(made.body.error.fields)).toMatch(/does not exist/);
    }
    const ok = await t.agent
      .post('/api/workshops')
      .set('Authorization', bearer(owner))
      .send({ title: 'Harbour Lane: dates', objective: 'Check dates', date: '2028-02-29', headcount: 12 });
    expect(ok.status).toBe(201);
    const changed = await t.agent.patch(`/api/workshops/${ok.body.id}`).set('Authorization', bearer(owner)).send({ date: '2027-02-30' });
    expect(changed.status).toBe(400);
  });
});

describe('CSV formulas (probe item 20)', () => {
  it('neutralises text that starts like a formula by default, and keeps it as written on request', async () => {
    // OWASP "CSV Injection": cells starting with = + - @, tab or carriage return are run by spreadsheets.
    // Notes are trimmed when they are stored, so a leading tab or carriage return is checked on toCsv below.
    const formulas = ['=HYPERLINK("http://example.invalid","click")', '+1+1', '-2+3', '@SUM(A1)'];
    const day = await liveDay(t, {
      title: 'Harbour Lane: formulas',
      phones: [{ displayName: '=Ana' }],
      notes: formulas.map((text) => ({ type: 'insights' as const, phone: 0, text })),
    });
    const download = async (query: string) => {
      const res = await t.agent.get(`/api/workshops/${day.workshopId}/exports/notes.csv${query}`).set('Authorization', bearer(day.ownerToken));
      expect(res.status).toBe(200);
      return parse(res.text, { bom: true, record_delimiter: '\r\n' }) as string[][];
    };
    const safe = (await download('')).slice(1);
    expect(safe.map((r) => r[8])).toEqual(formulas.map((f) => `'${f}`));
    expect(new Set(safe.map((r) => r[3]))).toEqual(new Set(["'=Ana"]));
    const raw = (await download('?raw=true')).slice(1);
    expect(raw.map((r) => r[8])).toEqual(formulas);
    const table = { header: ['a', 'b', 'c'], rows: [['\tTab first', '\rReturn first', 'plain - text']] };
    expect(parse(toCsv(table, { bom: false }), { record_delimiter: '\r\n' })[1]).toEqual(["'\tTab first", "'\rReturn first", 'plain - text']);
    expect(parse(toCsv(table, { bom: false, raw: true }), { record_delimiter: '\r\n' })[1]).toEqual(['\tTab first', '\rReturn first', 'plain - text']);
  });
});

describe('content security policy (probe item 21)', () => {
  it('lets the page connect to its own origin only: no WebSockets to any host', async () => {
    const csp = (await t.agent.get('/api/health')).headers['content-security-policy'] as string;
    const connect = csp.split(';').map((d) => d.trim()).find((d) => d.startsWith('connect-src'));
    expect(connect).toBe("connect-src 'self'");
  });
});

describe('file modes (probe item 22)', () => {
  it.skipIf(process.platform === 'win32')('creates the database, its -wal and -shm owner-only, and the data and upload folders closed to others', async () => {
    const parent = fs.mkdtempSync(path.join(os.tmpdir(), 'cairn-modes-'));
    const dataDir = path.join(parent, 'data');
    const own = await startTestApp({ DATA_DIR: dataDir });
    try {
      // A write, so the -wal and -shm files exist.
      await own.tokenFor('facilitator');
      await own.agent.post('/api/workshops').set('Authorization', bearer(await own.tokenFor('facilitator'))).send({ title: 'Harbour Lane: modes', objective: 'x', date: '2027-03-14', headcount: 4 });
      const db = own.cairn.ctx.config.databasePath;
      for (const file of [db, `${db}-wal`, `${db}-shm`]) {
        expect(fs.existsSync(file), file).toBe(true);
        expect((fs.statSync(file).mode & 0o777).toString(8), file).toBe('600');
      }
      expect((fs.statSync(dataDir).mode & 0o077).toString(8)).toBe('0');
    } finally {
      await own.close();
    }
    // An older install whose files were created 644 is narrowed at start-up.
    const db = path.join(dataDir, 'cairn.sqlite');
    fs.chmodSync(db, 0o644);
    fs.chmodSync(dataDir, 0o755);
    fs.mkdirSync(path.join(dataDir, 'uploads'), { recursive: true });
    fs.chmodSync(path.join(dataDir, 'uploads'), 0o755);
    const again = await startTestApp({ DATA_DIR: dataDir });
    try {
      expect((fs.statSync(db).mode & 0o777).toString(8)).toBe('600');
      expect((fs.statSync(dataDir).mode & 0o077).toString(8)).toBe('0');
      expect((fs.statSync(path.join(dataDir, 'uploads')).mode & 0o077).toString(8)).toBe('0');
    } finally {
      await again.close();
      fs.rmSync(parent, { recursive: true, force: true });
    }
  });
});
