import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { addMember, bearer, createStranger, liveDay, startTestApp, type LiveDay, type TestAccount, type TestApp } from './helpers';
import { WorkshopResults, type NoteResult, type ResultSection } from '../../shared/schemas/results';
import { computeSchedule } from '../../shared/schedule';

// The invented Harbour Lane Bike Co-op: four volunteers in two teams, notes that are hard to carry.
const NOTES = {
  plain: 'Unlocking took three tries, then the app froze',
  quotes: 'She said "the dock beeped" — twice',
  lines: 'Line one\nline two, with a comma',
  cyrillic: 'Замок не открылся с первого раза',
  greek: 'Ο σταθμός ήταν άδειος',
  html: '<b>bold?</b> & <script>alert(1)</script>',
};

let t: TestApp;
let day: LiveDay;
let cofacilitator: TestAccount;
let stranger: TestAccount;
const tokens: Record<string, string> = {};

beforeAll(async () => {
  t = await startTestApp();
  day = await liveDay(t, {
    phones: [
      { displayName: 'Ana Lima', photoConsent: true },
      { displayName: 'Ben Okafor', photoConsent: false },
      { displayName: 'Chidi Brandt', photoConsent: true },
      { displayName: 'Dora Wilde', photoConsent: true },
    ],
    teams: [
      { name: 'Team Dock', challenge: 'Make unlocking obvious', phones: [0, 1] },
      { name: 'Team Route', challenge: 'A calm first route', phones: [2, 3] },
    ],
    notes: [
      { type: 'insights', phone: 0, text: NOTES.plain },
      { type: 'insights', phone: 1, text: NOTES.quotes },
      { type: 'insights', phone: 2, text: NOTES.lines },
      { type: 'insights', phone: 0, text: NOTES.cyrillic },
      { type: 'insights', phone: 2, text: NOTES.greek },
      { type: 'insights', phone: 1, text: NOTES.html },
      // Team Route tests Team Dock's prototype.
      { type: 'test_rounds', phone: 2, kind: 'feedback', part: 'worked', text: 'The map card was clear', fields: (teams) => ({ hostTeamId: teams.get('Team Dock')! }) },
      { type: 'test_rounds', phone: 3, kind: 'feedback', part: 'questions', text: 'Where is the nearest dock?', fields: (teams) => ({ hostTeamId: teams.get('Team Dock')! }) },
      { type: 'closing', phone: 3, kind: 'reflection', part: 'next_step', text: 'Prototype the welcome ride card next week' },
    ],
  });
  cofacilitator = await createStranger(t, 'cofacilitator');
  await addMember(t, day.workshopId, cofacilitator.id, 'cofacilitator');
  stranger = await createStranger(t, 'stranger');
  tokens.owner = day.ownerToken;
  tokens.cofacilitator = cofacilitator.token;
  tokens.observer = await t.tokenFor('observer');
  tokens.admin = await t.tokenFor('admin');
  tokens.stranger = stranger.token;
  tokens.participant = day.phones[0]!.answer.token;
});
afterAll(() => t?.close());

async function results(query = ''): Promise<WorkshopResults> {
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results${query}`).set('Authorization', bearer(tokens.owner!));
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return WorkshopResults.parse(res.body);
}

function sectionOf<K extends ResultSection['kind']>(r: WorkshopResults, type: string, kind: K): Extract<ResultSection, { kind: K }> {
  const activity = r.activities.find((a) => a.type === type)!;
  const section = activity.sections.find((s) => s.kind === kind);
  expect(section, `${type} has a ${kind} section`).toBeDefined();
  return section as Extract<ResultSection, { kind: K }>;
}

describe('the results of a workshop', () => {
  it('lists every activity in agenda order, with the agenda as run against the plan', async () => {
    const r = await results();
    expect(r.activities.map((a) => a.itemId)).toEqual(day.agenda.map((i) => i.id));
    expect(r.activities.map((a) => a.position)).toEqual(day.agenda.map((_, i) => i + 1));
    // The planned times are the planner's schedule (shared/schedule.ts), laid from the window's start.
    const w = await t.agent.get(`/api/workshops/${day.workshopId}`).set('Authorization', bearer(tokens.owner!));
    const schedule = computeSchedule(w.body.agenda, w.body.window, w.body.rules);
    expect(r.agenda.map((a) => [a.plannedStart, a.plannedEnd])).toEqual(schedule.items.map((i) => [i.start, i.end]));
    // What ran: the first item (the session starts on it), then the items the facilitator went to.
    const ran = r.agenda.filter((a) => a.runCount > 0).map((a) => a.type);
    expect(ran).toEqual(['welcome', 'insights', 'test_rounds', 'closing']);
    for (const a of r.agenda) {
      if (a.runCount === 0) {
        expect([a.actualStart, a.actualEnd, a.actualMin, a.overMin]).toEqual([null, null, null, null]);
      } else {
        expect(a.actualEnd!).toBeGreaterThanOrEqual(a.actualStart!);
        expect(a.overMin).toBeCloseTo(a.actualMin! - a.plannedMin, 1);
      }
    }
    expect(r.sessions).toHaveLength(1);
    expect(r.sessions[0]!.status).toBe('ended');
  });

  it('shows the notes of an activity by team, exactly as the phones wrote them (HTML stays text)', async () => {
    const r = await results();
    const notes = sectionOf(r, 'insights', 'notes');
    expect(notes.total).toBe(6);
    expect(notes.byTheme).toEqual([]);
    expect(notes.byTeam.map((g) => [g.label, g.notes.length])).toEqual([
      ['Team Dock', 4],
      ['Team Route', 2],
    ]);
    const texts = notes.byTeam.flatMap((g) => g.notes.map((n) => n.text));
    expect(texts.sort()).toEqual(Object.values(NOTES).sort());
    const html = notes.byTeam.flatMap((g) => g.notes).find((n) => n.text === NOTES.html)!;
    expect(html.author).toBe('Ben Okafor');
    expect(html.teamName).toBe('Team Dock');
  });

  it('fills the feedback capture grid of test rounds in its four parts', async () => {
    const r = await results();
    const feedback = sectionOf(r, 'test_rounds', 'feedback');
    expect(feedback.grids).toHaveLength(1);
    const grid = feedback.grids[0]!;
    expect(grid.teamName).toBe('Team Dock');
    expect(grid.parts.map((p) => [p.label, p.notes.map((n) => n.text)])).toEqual([
      // The feedback capture grid's four parts (d.school method card), in Cairn's words.
      ['What worked', ['The map card was clear']],
      ["What didn't work", []],
      ['Questions', ['Where is the nearest dock?']],
      ['Ideas', []],
    ]);
  });

  it('has teams with their challenges, participation figures and the next steps', async () => {
    const r = await results();
    expect(r.teams.map((team) => [team.name, team.challenge, team.members.map((m) => m.name)])).toEqual([
      ['Team Dock', 'Make unlocking obvious', ['Ana Lima', 'Ben Okafor']],
      ['Team Route', 'A calm first route', ['Chidi Brandt', 'Dora Wilde']],
    ]);
    expect(r.participation).toMatchObject({ joined: 4, withPhotoConsent: 3, withAddress: 0, notesTotal: 9 });
    const insights = r.participation.perActivity.find((a) => a.title === r.activities.find((x) => x.type === 'insights')!.title)!;
    expect(insights).toMatchObject({ notes: 6, contributors: 3, rate: 0.75 });
    expect(r.nextSteps.map((n) => n.text)).toEqual(['Prototype the welcome ride card next week']);
    expect(sectionOf(r, 'closing', 'reflections').notes.map((n) => n.author)).toEqual(['Dora Wilde']);
    expect(r.participants.map((p) => [p.number, p.name, p.teamName, p.photoConsent, p.notes])).toEqual([
      [1, 'Ana Lima', 'Team Dock', true, 2],
      [2, 'Ben Okafor', 'Team Dock', false, 2],
      [3, 'Chidi Brandt', 'Team Route', true, 3],
      [4, 'Dora Wilde', 'Team Route', true, 2],
    ]);
  });

  it('removes every name on request: participants become "Participant N" in order of joining', async () => {
    const r = await results('?anonymize=true');
    expect(r.anonymized).toBe(true);
    const text = JSON.stringify(r);
    for (const name of ['Ana Lima', 'Ben Okafor', 'Chidi Brandt', 'Dora Wilde']) expect(text).not.toContain(name);
    expect(r.participants.map((p) => p.name)).toEqual(['Participant 1', 'Participant 2', 'Participant 3', 'Participant 4']);
    const authors = new Set(r.notes.map((n: NoteResult) => n.author));
    expect([...authors].sort()).toEqual(['Participant 1', 'Participant 2', 'Participant 3', 'Participant 4']);
    expect(r.teams[0]!.members.map((m) => m.name)).toEqual(['Participant 1', 'Participant 2']);
  });

  it('groups notes by the affinity themes the facilitators made, the rest apart', async () => {
    const { Theme, Submission } = t.cairn.ctx.db.models;
    const insights = day.agenda.find((i) => i.type === 'insights')!;
    // A theme as the activities feature keeps one (themes:create while the session ran).
    await Theme.create({ id: crypto.randomUUID(), sessionId: day.sessionId, itemId: insights.id, name: 'Unlocking', position: 0 });
    const theme = await Theme.findOne({ where: { name: 'Unlocking' } });
    await Submission.update({ themeId: theme!.id }, { where: { text: [NOTES.plain, NOTES.cyrillic] } });
    try {
      const r = await results();
      const notes = sectionOf(r, 'insights', 'notes');
      expect(notes.byTheme.map((g) => [g.label, g.notes.map((n) => n.text)])).toEqual([
        ['Unlocking', [NOTES.plain, NOTES.cyrillic]],
        ['Not in a theme', [NOTES.quotes, NOTES.lines, NOTES.greek, NOTES.html]],
      ]);
      expect(r.notes.find((n) => n.text === NOTES.plain)!.themeName).toBe('Unlocking');
    } finally {
      await Submission.update({ themeId: null }, { where: { themeId: theme!.id } });
      await theme!.destroy();
    }
  });

  it('leaves out notes the facilitators hid while moderating', async () => {
    const { Submission } = t.cairn.ctx.db.models;
    const row = await Submission.findOne({ where: { text: NOTES.greek } });
    await row!.update({ hidden: true });
    try {
      const r = await results();
      expect(r.notes.map((n) => n.text)).not.toContain(NOTES.greek);
      expect(sectionOf(r, 'insights', 'notes').total).toBe(5);
    } finally {
      await row!.update({ hidden: false });
    }
  });

  it('answers 404 for a workshop that does not exist', async () => {
    const res = await t.agent.get('/api/workshops/no-such-workshop/results').set('Authorization', bearer(tokens.owner!));
    expect(res.status).toBe(404);
  });
});

describe('who may reach the results, the exports, the report, sending and deleting', () => {
  type Who = 'owner' | 'cofacilitator' | 'observer' | 'admin' | 'stranger' | 'participant' | 'signedOut';
  const WHO: Who[] = ['owner', 'cofacilitator', 'observer', 'admin', 'stranger', 'participant', 'signedOut'];
  const readers: Who[] = ['owner', 'cofacilitator', 'observer', 'admin'];
  const editors: Who[] = ['owner', 'cofacilitator'];
  const owners: Who[] = ['owner'];

  /** A request each caller makes; a refused body is enough to prove an allowed caller got past the role check. */
  const ROUTES: { name: string; allowed: Who[]; call: (token: string | undefined) => Promise<{ status: number; body: { error?: { code: string } } }> }[] = [
    { name: 'GET results', allowed: readers, call: (tk) => req('get', '/results', tk) },
    { name: 'GET notes.csv', allowed: readers, call: (tk) => req('get', '/exports/notes.csv', tk) },
    { name: 'GET results.json', allowed: readers, call: (tk) => req('get', '/exports/results.json', tk) },
    { name: 'GET report.pdf', allowed: readers, call: (tk) => req('get', '/report.pdf', tk) },
    { name: 'GET retention', allowed: readers, call: (tk) => req('get', '/retention', tk) },
    { name: 'GET recipients', allowed: editors, call: (tk) => req('get', '/report/recipients', tk) },
    // An empty choice of people: the role check passes or fails before the body is read.
    { name: 'POST report/send', allowed: editors, call: (tk) => req('post', '/report/send', tk, { memberIds: [], participantIds: [] }) },
    { name: 'PUT retention', allowed: owners, call: (tk) => req('put', '/retention', tk, { retentionDays: 'soon' }) },
    { name: 'POST retention/delete-now', allowed: owners, call: (tk) => req('post', '/retention/delete-now', tk, {}) },
  ];

  function req(method: 'get' | 'post' | 'put', path: string, token: string | undefined, body?: object) {
    let r = t.agent[method](`/api/workshops/${day.workshopId}${path}`);
    if (token) r = r.set('Authorization', bearer(token));
    return body ? r.send(body) : r;
  }

  describe.each(ROUTES)('$name', ({ allowed, call }) => {
    it.each(WHO)('as %s', async (who) => {
      const res = await call(who === 'signedOut' ? undefined : tokens[who]);
      const seen = `${res.status} ${JSON.stringify(res.body?.error ?? '')}`;
      if (allowed.includes(who)) {
        expect(res.status, seen).toBeLessThan(500);
        expect([401, 403], seen).not.toContain(res.status);
      } else if (who === 'signedOut' || who === 'participant') {
        // A participant's token is no account: it opens no workshop route.
        expect(res.status, seen).toBe(401);
      } else {
        expect(res.status, seen).toBe(403);
        expect(res.body.error?.code).toBe('forbidden');
      }
    });
  });

  it('keeps observers to reading: no sending, no deleting, no retention change', async () => {
    for (const [method, path, body] of [
      ['post', '/report/send', { memberIds: [cofacilitator.id] }],
      ['post', '/retention/delete-now', { confirm: true }],
      ['put', '/retention', { retentionDays: 30 }],
    ] as const) {
      const res = await req(method, path, tokens.observer, body);
      expect(res.status, `${method} ${path}`).toBe(403);
    }
    const status = await req('get', '/retention', tokens.owner);
    expect(status.body.held.names).toBe(4);
  });

  it('lets a participant reach only their own data, never a workshop route', async () => {
    const mine = await t.agent.get('/api/participant/data').set('Authorization', bearer(tokens.participant!));
    expect(mine.status).toBe(200);
    expect(mine.body).toMatchObject({ displayName: 'Ana Lima', photoConsent: true, email: null, notes: 2 });
    for (const who of ['owner', 'observer'] as const) {
      const res = await t.agent.get('/api/participant/data').set('Authorization', bearer(tokens[who]!));
      expect(res.status).toBe(401);
    }
    const signedOut = await t.agent.put('/api/participant/report-email').send({ email: 'ana@harbourlane.example' });
    expect(signedOut.status).toBe(401);
  });
});
