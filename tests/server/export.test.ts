import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { bearer, liveDay, startTestApp, type LiveDay, type TestApp } from './helpers';
import { toCsv } from '../../server/features/results/export.service';
import { WorkshopResults } from '../../shared/schemas/results';
import { normaliseText } from '../../shared/text';
import { csvHeader, csvWord } from '../shared/english';

// Notes that break naive CSV writers: commas, quotes, line breaks (LF and CRLF), non-Latin text, formulas.
const HARD = [
  'Unlocking took three tries, then the app froze',
  'She said "the dock beeped" — twice',
  'Line one\nline two, with a comma',
  'Windows line\r\nbreak and "quotes", both',
  'Замок не открылся с первого раза',
  'Ο σταθμός ήταν άδειος',
  '自転車の鍵がかからない',
  '=HYPERLINK("http://example.invalid","click")',
  '-5 minutes late, +2 bikes missing',
  '@front desk: inner   spaces\tand a tab',
];
/** The notes as Cairn stores them: typed text is normalised (NFC, a CRLF line break kept as one LF). */
const STORED = HARD.map((n) => normaliseText(n, true));

/** OWASP "CSV Injection": a leading = + - @ (or tab, CR) gets an apostrophe; everything else is unchanged. */
function neutralised(n: string): string {
  return /^[=+\-@\t\r]/.test(n) ? `'${n}` : n;
}

let t: TestApp;
let day: LiveDay;
let token: string;

beforeAll(async () => {
  t = await startTestApp();
  day = await liveDay(t, {
    title: 'Harbour Lane: exports',
    phones: [
      { displayName: 'Ana Lima' },
      { displayName: 'Ben "Benji" Okafor', photoConsent: false },
      { displayName: 'Ólafur, Jr.' },
    ],
    teams: [
      { name: 'Team Dock', challenge: 'Make unlocking obvious, fast', phones: [0, 1] },
      { name: 'Team "Route"', challenge: 'A calm\nfirst route', phones: [2] },
    ],
    notes: HARD.map((text, i) => ({ type: 'insights' as const, phone: i % 3, text })),
  });
  token = await t.tokenFor('observer');
});
afterAll(() => t?.close());

async function download(file: string, query = ''): Promise<{ raw: Buffer; text: string; headers: Record<string, string> }> {
  const res = await t.agent
    .get(`/api/workshops/${day.workshopId}/exports/${file}${query}`)
    .set('Authorization', bearer(token))
    .buffer(true)
    .parse((r, done) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => done(null, Buffer.concat(chunks)));
    });
  expect(res.status, String(res.body)).toBe(200);
  const raw = res.body as Buffer;
  return { raw, text: raw.toString('utf8'), headers: res.headers as Record<string, string> };
}

async function results(anonymize = false): Promise<WorkshopResults> {
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results${anonymize ? '?anonymize=true' : ''}`).set('Authorization', bearer(token));
  return WorkshopResults.parse(res.body);
}

/** Checks a CSV against RFC 4180 and parses it back with csv-parse, an independent parser. */
function rfc4180(text: string): string[][] {
  // RFC 4180 §2.1: each record ends with CRLF; a bare CR or LF may only appear inside a quoted field.
  expect(text.endsWith('\r\n')).toBe(true);
  let quoted = false;
  for (let i = 0; i < text.length; i++) {
    const c = text[i];
    if (c === '"') quoted = !quoted;
    else if (!quoted && c === '\n') expect(text[i - 1], `LF outside quotes at ${i}`).toBe('\r');
    else if (!quoted && c === '\r') expect(text[i + 1], `CR outside quotes at ${i}`).toBe('\n');
  }
  expect(quoted, 'every quote is closed').toBe(false);
  const records = parse(text, { bom: true, relax_column_count: false, record_delimiter: '\r\n' }) as string[][];
  // RFC 4180 §2.3–2.4: the header has as many fields as every record.
  for (const r of records) expect(r.length).toBe(records[0]!.length);
  // RFC 4180 §2.6–2.7: a field with a comma, a quote or a line break is quoted, and its quotes doubled.
  for (const r of records) {
    for (const field of r) {
      if (/[",\r\n]/.test(field)) expect(text).toContain(`"${field.replace(/"/g, '""')}"`);
    }
  }
  return records;
}

describe('CSV exports (RFC 4180)', () => {
  it('writes the notes table so an independent parser reads back every note, field by field', async () => {
    const { text, headers, raw } = await download('notes.csv');
    expect(headers['content-type']).toMatch(/^text\/csv; charset=utf-8/);
    expect(headers['content-disposition']).toBe('attachment; filename=cairn-harbour-lane-exports-2027-03-13-notes.csv');
    // Without the spreadsheet option there is no byte-order mark; text that starts like a formula gets an apostrophe.
    expect([...raw.subarray(0, 3)]).not.toEqual([0xef, 0xbb, 0xbf]);
    const [header, ...rows] = rfc4180(text);
    expect(header).toEqual(csvHeader('session', 'activityNumber', 'activity', 'activityType', 'author', 'team', 'theme', 'kind', 'part', 'note', 'details', 'writtenAt'));
    const r = await results();
    const insights = r.agenda.find((a) => a.type === 'insights')!;
    expect(rows).toHaveLength(HARD.length);
    // Every row names the session it comes from.
    expect(r.sessions.filter((s) => s.included)).toHaveLength(1);
    rows.forEach((row, i) => {
      const note = r.notes[i]!;
      expect(row).toEqual([
        r.sessions[0]!.name,
        String(insights.position),
        insights.title,
        'insights',
        note.author,
        note.teamName ?? '',
        '',
        'note',
        '',
        neutralised(STORED[i]!),
        '',
        new Date(note.createdAt).toISOString(),
      ]);
    });
    expect(rows.map((row) => row[4])).toEqual(HARD.map((_, i) => ['Ana Lima', 'Ben "Benji" Okafor', 'Ólafur, Jr.'][i % 3]));
  });

  it('offers a byte-order mark for spreadsheets, and text exactly as written on request', async () => {
    const { raw, text } = await download('notes.csv', '?bom=true');
    expect([...raw.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const [, ...rows] = rfc4180(text);
    expect(rows.map((row) => row[9])).toEqual(STORED.map(neutralised));
    const [, ...rawRows] = rfc4180((await download('notes.csv', '?raw=true')).text);
    expect(rawRows.map((row) => row[9])).toEqual(STORED);
  });

  it('removes names on request: authors and members become "Participant N"', async () => {
    const notes = rfc4180((await download('notes.csv', '?anonymize=true')).text);
    expect(new Set(notes.slice(1).map((row) => row[4]))).toEqual(new Set(['Participant 1', 'Participant 2', 'Participant 3']));
    const everything = ['notes.csv', 'teams.csv', 'participants.csv', 'tallies.csv', 'votes.csv', 'results.json'];
    for (const file of everything) {
      const { text } = await download(file, '?anonymize=true');
      for (const name of ['Ana Lima', 'Benji', 'Ólafur']) expect(text, file).not.toContain(name);
    }
  });

  it('writes the teams table with challenges and members', async () => {
    const rows = rfc4180((await download('teams.csv')).text);
    const session = (await results()).sessions[0]!.name;
    expect(rows).toEqual([
      csvHeader('session', 'team', 'challenge', 'size', 'members'),
      [session, 'Team Dock', 'Make unlocking obvious, fast', '2', 'Ana Lima; Ben "Benji" Okafor'],
      [session, 'Team "Route"', 'A calm\nfirst route', '1', 'Ólafur, Jr.'],
    ]);
  });

  it('writes the participants table without any address', async () => {
    await t.cairn.ctx.db.models.Participant.update({ email: 'ana@harbourlane.example' }, { where: { id: day.phones[0]!.answer.me.id } });
    const { text } = await download('participants.csv');
    expect(text).not.toContain('@harbourlane.example');
    const rows = rfc4180(text);
    const r = await results();
    expect(rows[0]).toEqual(csvHeader('session', 'number', 'name', 'team', 'photoConsent', 'leftAddress', 'joinedAt', 'notes'));
    const [yes, no] = [csvWord('yes'), csvWord('no')];
    expect(rows.slice(1)).toEqual(
      r.participants.map((p) => [p.session, String(p.number), p.name, p.teamName ?? '', p.photoConsent ? yes : no, p.leftAddress ? yes : no, new Date(p.joinedAt).toISOString(), String(p.notes)]),
    );
    expect(rows.slice(1).map((row) => [row[2], row[4], row[5]])).toEqual([
      ['Ana Lima', yes, yes],
      ['Ben "Benji" Okafor', no, no],
      ['Ólafur, Jr.', yes, no],
    ]);
  });

  it('writes the tallies and votes tables with their headers even before any vote', async () => {
    const tallies = rfc4180((await download('tallies.csv')).text);
    expect(tallies[0]).toEqual(csvHeader('session', 'activityNumber', 'activity', 'method', 'rankedBy', 'option', 'score', 'rank', 'tied', 'nearTie', 'selected', 'matrixQuadrant'));
    const votes = rfc4180((await download('votes.csv')).text);
    expect(votes[0]).toEqual(csvHeader('session', 'activityNumber', 'activity', 'voter', 'option', 'criterion', 'value'));
  });

  it('gives the complete results as JSON that matches the results schema and the notes exactly', async () => {
    const { text, headers } = await download('results.json');
    expect(headers['content-type']).toMatch(/^application\/json/);
    const parsed = WorkshopResults.parse(JSON.parse(text));
    expect(parsed.notes.map((n) => n.text)).toEqual(STORED);
    expect(parsed.workshop.title).toBe('Harbour Lane: exports');
    expect(parsed.agenda).toHaveLength(day.agenda.length);
  });

  it('refuses a file it does not make', async () => {
    const res = await t.agent.get(`/api/workshops/${day.workshopId}/exports/secrets.csv`).set('Authorization', bearer(token));
    expect(res.status).toBe(400);
  });
});

describe('the CSV writer alone', () => {
  it('quotes exactly the fields RFC 4180 says to, doubles quotes and ends every record with CRLF', () => {
    const csv = toCsv({ header: ['a', 'b', 'c'], rows: [['x,y', 'say "hi"', 'one\ntwo'], ['plain', 7, true], [null, false, 'ü']] }, { bom: false });
    // RFC 4180 §2.6–2.7, e.g. its own example field "b""bb".
    expect(csv).toBe('a,b,c\r\n"x,y","say ""hi""","one\ntwo"\r\nplain,7,yes\r\n,no,ü\r\n');
  });

  it('refuses a record that is not as wide as the header', () => {
    expect(() => toCsv({ header: ['a', 'b'], rows: [['only one']] }, { bom: false })).toThrow(/header has 2/);
  });
});
