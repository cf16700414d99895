import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import {
  command,
  commandData,
  demoWorkshop,
  joinLive,
  nextEvent,
  startLive,
  startTestApp,
  type ClientSocket,
  type TestApp,
} from './helpers';
import { suggestThemes } from '../../shared/themes';
import type { ServerToClientEvents } from '../../shared/events';
import type { LiveSessionInfo } from '../../shared/schemas/live';

let t: TestApp;
let info: LiveSessionInfo;
let itemIds: string[];
let facilitator: ClientSocket;
let observer: ClientSocket;
let projector: ClientSocket;
const names = ['Ana Lindqvist', 'Ben Okafor', 'Cleo Marchetti', 'Dev Raman', 'Eli Novak'];
const phones: ClientSocket[] = [];
const ids: string[] = [];

// The demo's full-day agenda, by index.
const ICEBREAKER = 1;
const INTERVIEW = 2;
const EMPATHY_MAP = 3;
const INSIGHTS = 5;
const POINT_OF_VIEW = 6;
const HOW_MIGHT_WE = 7;
const STORYBOARD = 13;
const TEST_ROUNDS = 15;
const CLOSING = 16;

let clientIds = 0;
/** A phone's note to the current item (a fresh clientId each time). */
function note(i: number, body: Record<string, unknown>) {
  clientIds += 1;
  return command(phones[i]!, 'submission:create', { clientId: `activities-${clientIds}-note`, kind: 'note', ...body });
}

async function goto(index: number): Promise<string> {
  const state = await commandData(facilitator, 'session:goto', { index });
  return state.item!.id;
}

/** Every event of a kind a socket hears within `ms`. */
function collect<E extends keyof ServerToClientEvents>(socket: ClientSocket, event: E, ms: number): Promise<Parameters<ServerToClientEvents[E]>[0][]> {
  type Payload = Parameters<ServerToClientEvents[E]>[0];
  const seen: Payload[] = [];
  const untyped = socket as unknown as { on(ev: string, fn: (p: Payload) => void): void; off(ev: string, fn: (p: Payload) => void): void };
  const listener = (p: Payload) => seen.push(p);
  untyped.on(event, listener);
  return new Promise((resolve) => setTimeout(() => {
    untyped.off(event, listener);
    resolve(seen);
  }, ms));
}

beforeAll(async () => {
  t = await startTestApp();
  const token = await t.tokenFor('facilitator');
  const demo = await demoWorkshop(t);
  itemIds = demo.itemIds;
  info = await startLive(t, token, demo.id);
  facilitator = await t.connect(token);
  await commandData(facilitator, 'session:watch', { sessionId: info.sessionId });
  observer = await t.connect(await t.tokenFor('observer'));
  await commandData(observer, 'session:watch', { sessionId: info.sessionId });
  projector = await t.connect(new URL(info.displayUrl).searchParams.get('display')!);
  await commandData(projector, 'session:sync');
  // One at a time, a few milliseconds apart, so the order of joining (the pairing order) is certain.
  for (const displayName of names) {
    const joined = await joinLive(t, info.joinCode, { displayName });
    ids.push(joined.me.id);
    const socket = await t.connect(joined.token);
    await commandData(socket, 'session:sync');
    phones.push(socket);
    await new Promise((r) => setTimeout(r, 5));
  }
});
afterAll(() => t.close());

describe('rotating pairs for interviews and icebreakers', () => {
  it('pairs five people by the Berger table, one resting, and every phone hears the next round', async () => {
    const itemId = await goto(INTERVIEW);
    const round = await commandData(facilitator, 'rounds:get', { itemId });
    const pairs = (r: typeof round) => r.pairs.map((p) => [p.a.displayName[0], p.b.displayName[0]].sort().join('-')).sort();
    // FIDE Handbook C.05 Annex 1, 6 players (5 and a dummy 6, the bye): R1 1-6 2-5 3-4, R2 6-4 5-3 1-2.
    expect(round.round).toBe(0);
    expect(round.resting?.displayName).toBe('Ana Lindqvist');
    expect(pairs(round)).toEqual(['B-E', 'C-D']);
    expect(round.roundCount).toBe(2);

    const heard = nextEvent(phones[0]!, 'rounds:updated', (r) => r.round === 1);
    const next = await commandData(facilitator, 'rounds:set', { itemId, round: 1 });
    expect(next.resting?.displayName).toBe('Dev Raman');
    expect(pairs(next)).toEqual(['A-B', 'C-E']);
    expect((await heard).pairs).toEqual(next.pairs);
    // A phone reads the same round.
    expect((await commandData(phones[3]!, 'rounds:get', { itemId })).resting?.id).toBe(ids[3]);
  });

  it('lets only the facilitators move rounds', async () => {
    const itemId = itemIds[INTERVIEW]!;
    expect(await command(phones[0]!, 'rounds:set', { itemId, round: 0 })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(observer, 'rounds:set', { itemId, round: 0 })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(facilitator, 'rounds:set', { itemId, round: -1 })).toMatchObject({ error: { code: 'validation_failed' } });
    expect(await command(facilitator, 'rounds:get', { itemId: itemIds[INSIGHTS] })).toMatchObject({ error: { code: 'bad_request' } });
  });

  it('files interview notes under says, thinks, does or feels about the partner, and refuses other parts and none', async () => {
    const itemId = itemIds[INTERVIEW]!;
    const ok = await note(0, { itemId, part: 'says', text: 'I never know which dock has space', fields: { partnerId: ids[1], round: '1' } });
    expect(ok).toMatchObject({ data: { duplicate: false } });
    const wrong = await note(0, { itemId, part: 'sees', text: 'Hmm' });
    expect(wrong).toMatchObject({ error: { code: 'bad_request', message: expect.stringContaining('Says, Thinks, Does, Feels') } });
    const unfiled = await note(0, { itemId, text: 'Under no part', fields: { partnerId: ids[1], round: '1' } });
    expect(unfiled).toMatchObject({ error: { code: 'bad_request', message: expect.stringContaining('Says, Thinks, Does, Feels') } });
    const self = await note(0, { itemId, part: 'feels', text: 'Me', fields: { partnerId: ids[0] } });
    expect(self).toMatchObject({ error: { code: 'bad_request' } });
    const stray = await note(0, { itemId, part: 'feels', text: 'Extra', fields: { colour: 'red' } });
    expect(stray).toMatchObject({ error: { code: 'bad_request', message: expect.stringContaining('colour') } });
    const list = await commandData(facilitator, 'notes:list', { itemId });
    expect(list.notes.map((n) => [n.displayName, n.part, n.text])).toEqual([['Ana Lindqvist', 'says', 'I never know which dock has space']]);
  });

  it('reuses the same pairing for icebreaker rounds, and pairs newcomers when asked', async () => {
    const itemId = await goto(ICEBREAKER);
    const first = await commandData(facilitator, 'rounds:get', { itemId });
    expect(first.resting?.displayName).toBe('Ana Lindqvist');
    expect(first.newcomers).toEqual([]);

    const late = await joinLive(t, info.joinCode, { displayName: 'Fay Osei' });
    const lateSocket = await t.connect(late.token);
    await commandData(lateSocket, 'session:sync');
    const seen = await commandData(facilitator, 'rounds:get', { itemId });
    expect(seen.newcomers.map((p) => p.displayName)).toEqual(['Fay Osei']);
    expect(seen.pairs).toEqual(first.pairs);

    // The next round pairs the newcomer too, without pairing everyone again: six people, nobody rests.
    const next = await commandData(facilitator, 'rounds:set', { itemId, round: 1, regroup: false });
    expect(next.newcomers).toEqual([]);
    expect(next.resting).toBeNull();
    expect(next.pairs.flatMap((p) => [p.a.displayName, p.b.displayName])).toContain('Fay Osei');
    expect(next.pairs).toHaveLength(3);

    const regrouped = await commandData(facilitator, 'rounds:set', { itemId, round: 0, regroup: true });
    expect(regrouped.newcomers).toEqual([]);
    // Six people: FIDE Berger table R1 1-6 2-5 3-4, nobody rests.
    expect(regrouped.resting).toBeNull();
    expect(regrouped.pairs.map((p) => [p.a.displayName, p.b.displayName])).toEqual([
      ['Ana Lindqvist', 'Fay Osei'],
      ['Ben Okafor', 'Eli Novak'],
      ['Cleo Marchetti', 'Dev Raman'],
    ]);
    lateSocket.disconnect();
  });
});

describe("a team's empathy map", () => {
  let teamOf: Map<string, string>;

  it('shows teammates each other’s notes as they come, and nobody else', async () => {
    const teams = await commandData(facilitator, 'teams:set', {
      teams: [
        { name: 'Docks', memberIds: [ids[0]!, ids[1]!, ids[2]!] },
        { name: 'Unlocking', memberIds: [ids[3]!, ids[4]!] },
      ],
    });
    teamOf = new Map(teams.flatMap((team) => team.members.map((m) => [m.id, team.id] as const)));
    const itemId = await goto(EMPATHY_MAP);
    // The move between team rooms happens right after the commit; give it a moment.
    await new Promise((r) => setTimeout(r, 100));
    const teammate = nextEvent(phones[1]!, 'notes:added', (n) => n.text === 'Everyone else seems to know the app');
    const outsider = collect(phones[3]!, 'notes:added', 500);
    expect(await note(0, { itemId, part: 'hears', text: 'Everyone else seems to know the app' })).toMatchObject({ data: { duplicate: false } });
    const seen = await teammate;
    expect(seen).toMatchObject({ part: 'hears', displayName: 'Ana Lindqvist', teamId: teamOf.get(ids[0]!) });
    expect(await outsider).toEqual([]);

    await note(3, { itemId, part: 'thinks_feels', text: 'Worried the bike will not unlock' });
    const board = await commandData(phones[1]!, 'activity:board', { itemId });
    expect(board.notes.map((n) => n.text)).toEqual(['Everyone else seems to know the app']);
    const console = await commandData(facilitator, 'notes:list', { itemId });
    expect(console.notes).toHaveLength(2);
  });

  it('takes pains and gains only when the item sets them', async () => {
    const answer = await note(0, { itemId: itemIds[EMPATHY_MAP], part: 'pains', text: 'Fear of a fine' });
    expect(answer).toMatchObject({ error: { code: 'bad_request' } });
  });
});

describe('moderating a note stream', () => {
  const texts = [
    'The dock near the station was full',
    'No free dock near home after nine',
    '<img src=x onerror="alert(1)"> saddle height',
    'The saddle was too high for me',
  ];
  let itemId: string;
  let noteIds: string[];

  beforeAll(async () => {
    itemId = await goto(INSIGHTS);
    for (const [i, text] of texts.entries()) await note(i, { itemId, text });
    noteIds = (await commandData(facilitator, 'notes:list', { itemId })).notes.map((n) => n.id);
  });

  it('refuses empty and overlong notes with a message, and keeps HTML as the text it is', async () => {
    expect(await note(0, { itemId, text: '   ' })).toMatchObject({ error: { code: 'validation_failed', message: expect.stringContaining('Write something first') } });
    expect(await note(0, { itemId, text: 'x'.repeat(501) })).toMatchObject({ error: { code: 'validation_failed', message: expect.stringContaining('500') } });
    const board = await commandData(projector, 'activity:board', { itemId });
    expect(board.notes.map((n) => n.text)).toContain('<img src=x onerror="alert(1)"> saddle height');
  });

  it('hides a note from the room and the phones, and shows it again on undo', async () => {
    const changed = nextEvent(projector, 'activity:changed', (c) => c.itemId === itemId);
    const [hidden] = await commandData(facilitator, 'notes:hide', { noteIds: [noteIds[2]], hidden: true });
    expect(hidden).toMatchObject({ id: noteIds[2], hidden: true });
    await changed;
    const room = await commandData(projector, 'activity:board', { itemId });
    expect(room.notes.map((n) => n.id)).not.toContain(noteIds[2]);
    // The room sees no names.
    expect(room.notes.every((n) => n.displayName === null && n.participantId === null)).toBe(true);
    expect((await commandData(observer, 'activity:board', { itemId })).notes.map((n) => n.id)).not.toContain(noteIds[2]);
    // The console still lists it, marked, so it can be shown again.
    expect((await commandData(facilitator, 'notes:list', { itemId })).notes.find((n) => n.id === noteIds[2])?.hidden).toBe(true);

    await commandData(facilitator, 'notes:hide', { noteIds: [noteIds[2]], hidden: false });
    expect((await commandData(projector, 'activity:board', { itemId })).notes.map((n) => n.id)).toContain(noteIds[2]);
  });

  it('merges a duplicate under the kept note and splits it again', async () => {
    const merged = await commandData(facilitator, 'notes:merge', { keepId: noteIds[3], duplicateIds: [noteIds[2]] });
    expect(merged.find((n) => n.id === noteIds[3])?.duplicates).toBe(1);
    expect(merged.find((n) => n.id === noteIds[2])?.mergedIntoId).toBe(noteIds[3]);
    const room = await commandData(projector, 'activity:board', { itemId });
    expect(room.notes.map((n) => n.id)).not.toContain(noteIds[2]);
    expect(room.notes.find((n) => n.id === noteIds[3])?.duplicates).toBe(1);
    // A merged duplicate cannot be themed on its own.
    expect(await command(facilitator, 'themes:create', { itemId, name: 'Saddles', noteIds: [noteIds[2]] })).toMatchObject({ error: { code: 'bad_request' } });

    await commandData(facilitator, 'notes:unmerge', { noteId: noteIds[2] });
    expect((await commandData(projector, 'activity:board', { itemId })).notes.map((n) => n.id)).toContain(noteIds[2]);
  });

  it('groups notes into a theme, renames it, moves notes in and out, and removes it', async () => {
    const theme = await commandData(facilitator, 'themes:create', { itemId, name: 'Docks', noteIds: [noteIds[0], noteIds[1]] });
    expect(theme).toMatchObject({ name: 'Docks', position: 0 });
    const renamed = await commandData(facilitator, 'themes:rename', { themeId: theme.id, name: 'Finding a free dock' });
    expect(renamed.name).toBe('Finding a free dock');
    await commandData(facilitator, 'themes:assign', { themeId: theme.id, noteIds: [noteIds[3]] });
    await commandData(facilitator, 'themes:assign', { themeId: null, noteIds: [noteIds[3]] });
    const board = await commandData(projector, 'activity:board', { itemId });
    expect(board.themes).toEqual([{ id: theme.id, name: 'Finding a free dock', position: 0 }]);
    expect(board.notes.filter((n) => n.themeId === theme.id).map((n) => n.id).sort()).toEqual([noteIds[0], noteIds[1]].sort());

    expect(await command(facilitator, 'themes:rename', { themeId: theme.id, name: '  ' })).toMatchObject({ error: { code: 'validation_failed' } });
    expect(await command(phones[0]!, 'themes:create', { itemId, name: 'Mine', noteIds: [] })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(observer, 'themes:assign', { themeId: null, noteIds: [noteIds[0]] })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await command(observer, 'notes:list', { itemId })).toMatchObject({ error: { code: 'forbidden' } });

    await commandData(facilitator, 'themes:delete', { themeId: theme.id });
    const after = await commandData(facilitator, 'notes:list', { itemId });
    expect(after.themes).toEqual([]);
    expect(after.notes.every((n) => n.themeId === null)).toBe(true);
  });

  it('accepts suggested themes from the visible notes', async () => {
    const visible = (await commandData(facilitator, 'notes:list', { itemId })).notes.filter((n) => !n.hidden && !n.mergedIntoId);
    const suggestions = suggestThemes(visible.map((n) => ({ id: n.id, text: n.text })));
    // The two dock notes share "dock"; the two saddle notes share "saddle".
    expect(suggestions.map((s) => s.label).sort()).toEqual(['dock', 'saddle']);
    const made = await commandData(facilitator, 'themes:apply', { itemId, groups: suggestions.map((s) => ({ name: s.label, noteIds: s.noteIds })) });
    expect(made.map((m) => m.name)).toEqual(suggestions.map((s) => s.label));
    const twice = await command(facilitator, 'themes:apply', { itemId, groups: [{ name: 'a', noteIds: [noteIds[0]] }, { name: 'b', noteIds: [noteIds[0]] }] });
    expect(twice).toMatchObject({ error: { code: 'bad_request' } });
  });

  it('promotes a theme and a note to options of a later vote, once each, and any screen reads them', async () => {
    const board = await commandData(facilitator, 'notes:list', { itemId });
    const dock = board.themes.find((th) => th.name === 'dock')!;
    const heard = nextEvent(facilitator, 'promotions:updated', (list) => list.length === 1);
    const promoted = await commandData(facilitator, 'notes:promote', { sourceKind: 'theme', sourceId: dock.id });
    expect(promoted).toMatchObject({ text: 'dock', sourceKind: 'theme', sourceId: dock.id, itemId });
    expect(await heard).toHaveLength(1);
    expect((await commandData(facilitator, 'notes:promote', { sourceKind: 'theme', sourceId: dock.id })).id).toBe(promoted.id);
    await commandData(facilitator, 'themes:rename', { themeId: dock.id, name: 'Find a free dock' });
    const single = await commandData(facilitator, 'notes:promote', { sourceKind: 'note', sourceId: noteIds[3] });

    const options = await commandData(phones[2]!, 'notes:promoted', {});
    expect(options.map((o) => [o.text, o.sourceKind])).toEqual([
      ['Find a free dock', 'theme'],
      ['The saddle was too high for me', 'note'],
    ]);
    expect(await commandData(projector, 'notes:promoted', { itemId })).toEqual(options);
    expect(await command(phones[2]!, 'notes:promote', { sourceKind: 'note', sourceId: noteIds[0] })).toMatchObject({ error: { code: 'forbidden' } });

    const left = await commandData(facilitator, 'notes:unpromote', { promotionId: single.id });
    expect(left.map((o) => o.id)).toEqual([promoted.id]);
    expect(await command(facilitator, 'notes:promote', { sourceKind: 'note', sourceId: 'no-such-note' })).toMatchObject({ error: { code: 'not_found' } });
  });
});

describe('guided sentences', () => {
  it('takes a complete point of view and refuses one with an empty field', async () => {
    const itemId = await goto(POINT_OF_VIEW);
    const fields = { user: 'A new member', need: 'to find a free dock', insight: 'a full dock ends the first ride badly' };
    const text = 'A new member needs to find a free dock because a full dock ends the first ride badly';
    expect(await command(phones[0]!, 'submission:create', { clientId: 'pov-complete-1', itemId, kind: 'point_of_view', text, fields })).toMatchObject({ data: {} });
    const missing = await command(phones[0]!, 'submission:create', { clientId: 'pov-missing-1', itemId, kind: 'point_of_view', text, fields: { ...fields, insight: ' ' } });
    expect(missing).toMatchObject({ error: { code: 'validation_failed', message: expect.stringContaining('Why?') } });
  });

  it('takes a complete how might we question and refuses a field over the limit', async () => {
    const itemId = await goto(HOW_MIGHT_WE);
    const fields = { action: 'make unlocking obvious', user: 'a new member', outcome: 'they ride off without help' };
    const text = 'How might we make unlocking obvious for a new member so that they ride off without help?';
    expect(await command(phones[1]!, 'submission:create', { clientId: 'hmw-complete-1', itemId, kind: 'how_might_we', text, fields })).toMatchObject({ data: {} });
    const long = await command(phones[1]!, 'submission:create', { clientId: 'hmw-long-1', itemId, kind: 'how_might_we', text, fields: { ...fields, outcome: 'o'.repeat(201) } });
    expect(long).toMatchObject({ error: { code: 'validation_failed' } });
  });
});

describe('storyboards', () => {
  it('keeps each team’s frames in the order the phone or the console puts them', async () => {
    const itemId = await goto(STORYBOARD);
    for (const text of ['Signs up on the phone', 'Walks to the dock', 'Unlocks the bike']) {
      await note(0, { itemId, kind: 'frame', text });
    }
    await note(3, { itemId, kind: 'frame', text: 'Other team frame' });
    const mine = await commandData(phones[1]!, 'activity:board', { itemId });
    const frames = mine.notes.filter((n) => n.kind === 'frame');
    expect(frames.map((f) => f.text)).toEqual(['Signs up on the phone', 'Walks to the dock', 'Unlocks the bike']);
    const key = frames[0]!.storyKey;

    const order = await commandData(phones[1]!, 'storyboard:reorder', { itemId, frameIds: [frames[2]!.id, frames[0]!.id] });
    // Frames not named keep their place after the named ones.
    expect(order).toEqual([frames[2]!.id, frames[0]!.id, frames[1]!.id]);
    expect((await commandData(projector, 'activity:board', { itemId })).frameOrders[key]).toEqual(order);

    const other = (await commandData(facilitator, 'notes:list', { itemId })).notes.find((n) => n.text === 'Other team frame')!;
    expect(await command(phones[1]!, 'storyboard:reorder', { itemId, frameIds: [other.id] })).toMatchObject({ error: { code: 'bad_request' } });
    const arranged = await commandData(facilitator, 'storyboard:arrange', { itemId, storyKey: key, frameIds: frames.map((f) => f.id) });
    expect(arranged).toEqual(frames.map((f) => f.id));
    expect(await command(observer, 'storyboard:arrange', { itemId, storyKey: key, frameIds: [] })).toMatchObject({ error: { code: 'forbidden' } });
    expect(await note(0, { itemId: itemIds[STORYBOARD], kind: 'sketch', text: 'Not a photo' })).toMatchObject({ error: { code: 'bad_request' } });
  });
});

describe('test rounds', () => {
  it('sends every tester to another team’s prototype and takes feedback in the four parts of the grid', async () => {
    const itemId = await goto(TEST_ROUNDS);
    const round = await commandData(phones[0]!, 'rounds:get', { itemId });
    expect(round.visits).toHaveLength(5);
    // testRotation's rule: nobody tests their own team's prototype.
    for (const v of round.visits) expect(v.hostTeamId).not.toBe(v.testerTeamId);
    const visit = round.visits.find((v) => v.tester.id === ids[0])!;

    const parts = ['worked', 'didnt_work', 'questions', 'ideas'];
    for (const part of parts) {
      const answer = await note(0, { itemId, kind: 'feedback', part, text: `About the ${part} part`, fields: { hostTeamId: visit.hostTeamId, round: '0' } });
      expect(answer).toMatchObject({ data: { duplicate: false } });
    }
    const own = await note(0, { itemId, kind: 'feedback', part: 'ideas', text: 'Mine', fields: { hostTeamId: visit.testerTeamId } });
    expect(own).toMatchObject({ error: { code: 'bad_request', message: expect.stringContaining('another team') } });
    const noPart = await note(0, { itemId, kind: 'feedback', text: 'Unfiled', fields: { hostTeamId: visit.hostTeamId } });
    expect(noPart).toMatchObject({ error: { code: 'bad_request' } });

    // The console's grid per team; the tested team's phones read the feedback on their prototype.
    const grid = (await commandData(facilitator, 'notes:list', { itemId })).notes.filter((n) => n.fields?.hostTeamId === visit.hostTeamId);
    expect(grid.map((n) => n.part)).toEqual(parts);
    const host = ids.findIndex((id, i) => i > 0 && round.visits.find((v) => v.tester.id === id)?.testerTeamId === visit.hostTeamId);
    expect((await commandData(phones[host]!, 'activity:board', { itemId })).notes.filter((n) => n.kind === 'feedback')).toHaveLength(4);
  });
});

describe('closing', () => {
  it('takes reflections and next steps', async () => {
    const itemId = await goto(CLOSING);
    expect(await note(2, { itemId, kind: 'reflection', part: 'next_step', text: 'Try the dock map with two new members' })).toMatchObject({ data: {} });
    expect(await note(2, { itemId, kind: 'reflection', part: 'reflection', text: 'Talking to riders changed my mind' })).toMatchObject({ data: {} });
    const list = await commandData(facilitator, 'notes:list', { itemId });
    expect(list.notes.map((n) => n.part)).toEqual(['next_step', 'reflection']);
  });
});
