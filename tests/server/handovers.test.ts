import fs from 'node:fs/promises';
import crypto from 'node:crypto';
import sharp from 'sharp';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { bearer, command, commandData, liveDay, nextEvent, startTestApp, type LiveDay, type TestApp } from './helpers';
import { WorkshopResults, voteScoreLabel, type ResultSection } from '../../shared/schemas/results';
import { feedbackOfRound } from '../../shared/schemas/activities';
import { mergeTeams, suggestTeamCount, teamSizeWarnings } from '../../shared/team-size';

// Each activity hands the next what it made, and each change reaches every screen (the invented Harbour Lane Bike Co-op).
let t: TestApp;

beforeAll(async () => {
  t = await startTestApp();
});
afterAll(() => t?.close());

/** A small PNG as a phone's camera would send. */
function png(): Promise<Buffer> {
  return sharp({ create: { width: 64, height: 48, channels: 3, background: '#0b5d5b' } }).png().toBuffer();
}

/** A phone uploads a photo to an item (multipart, as the phone does); answers the photo's id. */
async function upload(day: LiveDay, phone: number, itemId: string, caption: string, showsPeople: boolean): Promise<string> {
  const res = await t.agent
    .post('/api/live/photos')
    .set('Authorization', bearer(day.phones[phone]!.answer.token))
    .field('itemId', itemId)
    .field('clientId', `photo-${crypto.randomUUID()}`)
    .field('caption', caption)
    .field('showsPeople', String(showsPeople))
    .field('peopleConsent', String(showsPeople))
    .attach('photo', await png(), { filename: 'sketch.png', contentType: 'image/png' });
  expect(res.status, JSON.stringify(res.body)).toBe(201);
  return res.body.photoId as string;
}

async function results(day: LiveDay): Promise<WorkshopResults> {
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results`).set('Authorization', bearer(day.ownerToken));
  expect(res.status, JSON.stringify(res.body)).toBe(200);
  return WorkshopResults.parse(res.body);
}

function sections<K extends ResultSection['kind']>(r: WorkshopResults, type: string, kind: K): Extract<ResultSection, { kind: K }>[] {
  return (r.activities.find((a) => a.type === type)?.sections.filter((s) => s.kind === kind) ?? []) as Extract<ResultSection, { kind: K }>[];
}

const indexOf = (day: LiveDay, type: string) => day.agenda.findIndex((i) => i.type === type);

describe("a participant's contributions and consent", () => {
  it('removes their photos (rows and files) with their notes, and the personal-data counts follow', async () => {
    const day = await liveDay(t, { phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }], notes: [], stop: false });
    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'sketch') });
    const sketch = day.agenda[indexOf(day, 'sketch')]!.id;
    const anas = [await upload(day, 0, sketch, 'A dock with a big arrow', false), await upload(day, 0, sketch, 'Us at the dock', true)];
    const bens = await upload(day, 1, sketch, 'A calmer route', false);
    const keys = (await t.cairn.ctx.db.models.Photo.findAll({ where: { id: anas } })).map((p) => p.storageKey);
    const filesOf = async (k: string[]) => (await fs.readdir(t.cairn.ctx.config.uploadDir)).filter((n) => k.some((key) => n.startsWith(`${key}.`)));
    expect((await filesOf(keys)).length).toBeGreaterThan(0);
    const before = await t.agent.get(`/api/workshops/${day.workshopId}/retention`).set('Authorization', bearer(day.ownerToken));
    expect(before.body.held.photos).toBe(3);

    // Ben's phone hears that the boards changed, so the gallery drops Ana's sketches at once.
    const heard = nextEvent(day.phones[1]!.socket, 'activity:changed', (p) => p.itemId === sketch, 1000);
    const res = await t.agent.delete('/api/participant/notes').set('Authorization', bearer(day.phones[0]!.answer.token));
    expect(res.status).toBe(200);
    expect(res.body).toEqual({ removed: 2, photos: 2 });
    await heard;

    expect(await t.cairn.ctx.db.models.Photo.count({ where: { id: anas } })).toBe(0);
    expect(await t.cairn.ctx.db.models.Photo.count({ where: { id: bens } })).toBe(1);
    expect(await filesOf(keys)).toEqual([]);
    const after = await t.agent.get(`/api/workshops/${day.workshopId}/retention`).set('Authorization', bearer(day.ownerToken));
    expect(after.body.held.photos).toBe(1);
  });

  it('blurs (and shows again) a photo on the projector and the other phones within a second of a consent change', async () => {
    const day = await liveDay(t, { phones: [{ displayName: 'Ana Lima', photoConsent: true }, { displayName: 'Ben Okafor' }], notes: [], stop: false });
    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'sketch') });
    const sketch = day.agenda[indexOf(day, 'sketch')]!.id;
    await upload(day, 0, sketch, 'Us at the dock', true);
    const board = async () => (await commandData(day.phones[1]!.socket, 'activity:board', { itemId: sketch })).notes.find((n) => n.kind === 'sketch')!;
    expect((await board()).photo?.blurred).toBe(false);

    const projector = await t.connect(day.ownerToken);
    await commandData(projector, 'session:watch', { sessionId: day.sessionId });
    for (const [consent, blurred] of [[false, true], [true, false]] as const) {
      const started = Date.now();
      const onPhone = nextEvent(day.phones[1]!.socket, 'activity:changed', (p) => p.itemId === sketch, 1000);
      const onConsole = nextEvent(projector, 'activity:changed', (p) => p.itemId === sketch, 1000);
      await commandData(day.phones[0]!.socket, 'participant:consent', { photoConsent: consent });
      await Promise.all([onPhone, onConsole]);
      expect(Date.now() - started).toBeLessThan(1000);
      expect((await board()).photo?.blurred).toBe(blurred);
    }
  });
});

describe('moderation as the writer sees it', () => {
  it('keeps a merged duplicate on its writer’s phone, marked as merged, and off the others’', async () => {
    const day = await liveDay(t, {
      phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }],
      notes: [
        { type: 'insights', phone: 0, text: 'Unlocking took three tries' },
        { type: 'insights', phone: 1, text: 'Unlocking took 3 tries' },
      ],
      stop: false,
    });
    const item = day.agenda[indexOf(day, 'insights')]!.id;
    const all = await commandData(day.owner, 'notes:list', { itemId: item });
    const [keep, dupe] = all.notes;
    await commandData(day.owner, 'notes:merge', { keepId: keep!.id, duplicateIds: [dupe!.id] });
    const bens = await commandData(day.phones[1]!.socket, 'activity:board', { itemId: item });
    expect(bens.notes.filter((n) => n.participantId === day.phones[1]!.answer.me.id).map((n) => [n.text, n.mergedIntoId])).toEqual([
      ['Unlocking took 3 tries', keep!.id],
    ]);
    const anas = await commandData(day.phones[0]!.socket, 'activity:board', { itemId: item });
    expect(anas.notes.map((n) => n.text)).toEqual(['Unlocking took three tries']);
  });
});

describe('the results hand over what each activity made', () => {
  it('keeps sketch feedback out of the grids, next steps to the next steps, and no "No team" without teams', async () => {
    const day = await liveDay(t, {
      phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }],
      notes: [
        { type: 'insights', phone: 0, text: 'Unlocking took three tries' },
        { type: 'closing', phone: 0, kind: 'reflection', part: 'reflection', text: 'I liked the sketching' },
        { type: 'closing', phone: 1, kind: 'reflection', part: 'next_step', text: 'Try the welcome card next week' },
      ],
      stop: false,
    });
    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'sketch') });
    const sketchItem = day.agenda[indexOf(day, 'sketch')]!.id;
    await upload(day, 0, sketchItem, 'A dock with a big arrow', false);
    const sketch = (await commandData(day.owner, 'notes:list', { itemId: sketchItem })).notes.find((n) => n.kind === 'sketch')!;
    await commandData(day.phones[1]!.socket, 'submission:create', {
      clientId: `fb-${crypto.randomUUID()}`,
      itemId: sketchItem,
      kind: 'feedback',
      text: 'The arrow is clear',
      fields: { sketchId: sketch.id },
    });
    const r = await results(day);
    expect(sections(r, 'sketch', 'feedback')).toEqual([]);
    expect(sections(r, 'sketch', 'photos')[0]!.photos[0]!.feedback.map((f) => f.text)).toEqual(['The arrow is clear']);
    expect(r.nextSteps.map((n) => n.text)).toEqual(['Try the welcome card next week']);
    const insights = sections(r, 'insights', 'notes')[0]!;
    expect(insights.byTeam.map((g) => g.label)).toEqual(['']);
    expect(insights.byTeam[0]!.notes.map((n) => n.text)).toEqual(['Unlocking took three tries']);
  });

  it('counts the dot vote in participation and marks "carried forward" only in the ranking it came from', async () => {
    const day = await liveDay(t, {
      phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }, { displayName: 'Chidi Brandt' }],
      notes: [],
      stop: false,
    });
    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'dot_vote') });
    const vote = await commandData(day.owner, 'vote:setup', {
      options: [{ text: 'Make unlocking obvious' }, { text: 'A calm first route' }, { text: 'A welcome ride' }],
      rules: { dotsPerVoter: 2, capPerOption: 2, allowStacking: true, criteria: [{ id: 'cost', label: 'Low cost' }, { id: 'joy', label: 'Joy' }], rankBy: 'joy', topN: 1 },
    });
    await commandData(day.owner, 'vote:open', {});
    const [a, b] = vote.options;
    for (const phone of [0, 1, 2]) {
      await commandData(day.phones[phone]!.socket, 'vote:dot', { clientId: `d-${crypto.randomUUID()}`, optionId: a!.id, criterionId: 'joy', delta: 1 });
      for (let i = 0; i < 2; i++) {
        await commandData(day.phones[phone]!.socket, 'vote:dot', { clientId: `d-${crypto.randomUUID()}`, optionId: b!.id, criterionId: 'cost', delta: 1 });
      }
    }
    await commandData(day.owner, 'vote:close', {});
    const r = await results(day);
    const title = day.agenda[indexOf(day, 'dot_vote')]!.title;
    expect(r.participation.perActivity.find((p) => p.title === title)).toMatchObject({ contributors: 3, rate: 1 });
    const votes = sections(r, 'dot_vote', 'votes')[0]!;
    expect(votes.overall.filter((row) => row.selected).map((row) => row.label)).toEqual(['Make unlocking obvious']);
    for (const table of votes.tables) expect(table.rows.some((row) => row.selected), table.label).toBe(false);
  });

  it('drops the automatic deletion date once the personal data was deleted', async () => {
    const day = await liveDay(t, { phones: [{ displayName: 'Ana Lima' }], notes: [] });
    const set = await t.agent.put(`/api/workshops/${day.workshopId}/retention`).set('Authorization', bearer(day.ownerToken)).send({ retentionDays: 30 });
    expect(set.status, JSON.stringify(set.body)).toBe(200);
    expect(set.body.dueAt).not.toBeNull();
    const gone = await t.agent.post(`/api/workshops/${day.workshopId}/retention/delete-now`).set('Authorization', bearer(day.ownerToken)).send({ confirm: true });
    expect(gone.status, JSON.stringify(gone.body)).toBe(200);
    expect(gone.body.personalDataDeletedAt).not.toBeNull();
    expect(gone.body.dueAt).toBeNull();
  });
});

describe('rules the screens share', () => {
  it('labels a Borda table with points and a Schulze table with wins, whichever carries forward', () => {
    expect(voteScoreLabel('schulze')).toBe('Wins');
    expect(voteScoreLabel('schulze', 'borda')).toBe('Points');
    expect(voteScoreLabel('borda', 'schulze')).toBe('Wins');
    expect(voteScoreLabel('dots', 'impact')).toBe('Dots');
  });

  it('starts a fresh feedback grid each test round', () => {
    const notes = [
      { kind: 'feedback', fields: { round: '0', hostTeamId: 't1' }, text: 'round 1' },
      { kind: 'feedback', fields: { round: '1', hostTeamId: 't2' }, text: 'round 2' },
      { kind: 'feedback', fields: null, text: 'no round: the first' },
    ];
    expect(feedbackOfRound(notes, 0).map((n) => n.text)).toEqual(['round 1', 'no round: the first']);
    expect(feedbackOfRound(notes, 1).map((n) => n.text)).toEqual(['round 2']);
  });
});

describe('teams through the day', () => {
  it('keeps the names of the teams each activity ran with after a team sort, and confirming closes the sort', async () => {
    const day = await liveDay(t, {
      phones: ['Ana Lima', 'Ben Okafor', 'Chidi Brandt', 'Dora Wilde', 'Emil Sato'].map((displayName) => ({ displayName })),
      teams: [
        { name: 'Team Dock', challenge: null, phones: [0, 1, 2] },
        { name: 'Team Route', challenge: null, phones: [3, 4] },
      ],
      notes: [
        { type: 'empathy_map', phone: 0, part: 'says_does', text: 'I never know which dock is free' },
        { type: 'empathy_map', phone: 3, part: 'says_does', text: 'The first ride felt long' },
      ],
      stop: false,
    });
    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'team_sort') });
    const vote = await commandData(day.owner, 'vote:setup', { options: [{ text: 'Find a free dock' }, { text: 'Make unlocking obvious' }] });
    await commandData(day.owner, 'vote:open', {});
    const [dock, unlock] = vote.options.map((o) => o.id) as [string, string];
    for (const [i, p] of day.phones.entries()) {
      await commandData(p.socket, 'vote:rank', { clientId: `r-${crypto.randomUUID()}`, ranking: i < 3 ? [dock, unlock] : [unlock, dock] });
    }
    // While the room ranks, the sort has no confirmed teams: phones show none for it.
    expect((await commandData(day.phones[0]!.socket, 'vote:state', {})).chosen).toBeNull();
    const proposal = await commandData(day.owner, 'teams:propose', {});
    const heard = nextEvent(day.phones[0]!.socket, 'vote:updated', (v) => v.status === 'closed', 1000);
    const teams = await commandData(day.owner, 'teams:confirm', {
      teams: proposal.teams.map((team, i) => ({ name: `Team ${i + 1}`, challenge: team.challenge, memberIds: team.memberIds })),
    });
    expect(teams.map((team) => team.name)).toEqual(['Team 1', 'Team 2']);
    // Voting closes with the confirmation, and the confirmation is kept for a console that reloads.
    expect((await heard).chosen).toEqual([dock, unlock]);
    const state = await commandData(day.owner, 'vote:state', {});
    expect([state.status, state.chosen]).toEqual(['closed', [dock, unlock]]);
    const late = await command(day.phones[0]!.socket, 'vote:rank', { clientId: `r-${crypto.randomUUID()}`, ranking: [unlock, dock] });
    expect('error' in late).toBe(true);
    expect((await commandData(day.owner, 'teams:list', {})).map((team) => team.name)).toEqual(['Team 1', 'Team 2']);

    const r = await results(day);
    const map = sections(r, 'empathy_map', 'notes')[0]!;
    expect(map.byTeam.map((g) => [g.label, g.notes.map((n) => n.text)])).toEqual([
      ['Team Dock', ['I never know which dock is free']],
      ['Team Route', ['The first ride felt long']],
    ]);
    expect(r.teams.map((team) => [team.name, team.challenge])).toEqual([
      ['Team 1', 'Find a free dock'],
      ['Team 2', 'Make unlocking obvious'],
    ]);
  });

  it('suggests the teams formed, else the plan’s number, and warns outside 3–7 people with a merge to offer', () => {
    // Common practice (university design-thinking guides): teams of 3–7, ideally 5, at most 4 in a room.
    expect(suggestTeamCount({ people: 5, planned: 3, current: 0 })).toBe(3);
    expect(suggestTeamCount({ people: 5, planned: 3, current: 2 })).toBe(2);
    expect(suggestTeamCount({ people: 18 })).toBe(4);
    expect(suggestTeamCount({ people: 5 })).toBe(1);
    expect(teamSizeWarnings([2, 2, 1])).toEqual([
      { index: 0, size: 2, problem: 'small', mergeInto: 2 },
      { index: 1, size: 2, problem: 'small', mergeInto: 2 },
      { index: 2, size: 1, problem: 'small', mergeInto: 0 },
    ]);
    expect(teamSizeWarnings([5, 5, 4])).toEqual([]);
    expect(teamSizeWarnings([8, 3])).toEqual([{ index: 0, size: 8, problem: 'large', mergeInto: null }]);
    expect(mergeTeams([['a', 'b'], ['c', 'd'], ['e']], 2, 0)).toEqual([['a', 'b', 'e'], ['c', 'd']]);
  });
});

describe('promoted notes and themes in the next vote', () => {
  it('offers what was promoted first, notes marked, themes by name, each ready to take', async () => {
    const day = await liveDay(t, {
      phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }],
      notes: [
        { type: 'insights', phone: 0, text: 'Unlocking took three tries' },
        { type: 'insights', phone: 1, text: 'Nobody knew where to ride first' },
        { type: 'insights', phone: 1, text: 'The dock beeped twice' },
      ],
      stop: false,
    });
    const item = day.agenda[indexOf(day, 'insights')]!.id;
    const notes = (await commandData(day.owner, 'notes:list', { itemId: item })).notes;
    const byText = (text: string) => notes.find((n) => n.text === text)!.id;
    const theme = await commandData(day.owner, 'themes:create', { itemId: item, name: 'Docks confuse newcomers', noteIds: [byText('The dock beeped twice')] });
    await commandData(day.owner, 'notes:promote', { sourceKind: 'note', sourceId: byText('Unlocking took three tries') });
    await commandData(day.owner, 'notes:promote', { sourceKind: 'theme', sourceId: theme.id });

    await commandData(day.owner, 'session:goto', { index: indexOf(day, 'dot_vote') });
    const sources = await commandData(day.owner, 'vote:sources', {});
    expect(sources.promoted.map((p) => [p.sourceKind, p.text, p.submissionId])).toEqual([
      ['note', 'Unlocking took three tries', byText('Unlocking took three tries')],
      ['theme', 'Docks confuse newcomers', null],
    ]);
    expect(sources.notes.filter((n) => n.promoted).map((n) => n.text)).toEqual(['Unlocking took three tries']);
    // Taking them as the set-up does: a note by its id, a theme by its name.
    const vote = await commandData(day.owner, 'vote:setup', {
      options: sources.promoted.map((p) => (p.submissionId ? { submissionId: p.submissionId } : { text: p.text })),
    });
    expect(vote.options.map((o) => o.text)).toEqual(['Unlocking took three tries', 'Docks confuse newcomers']);
  });
});
