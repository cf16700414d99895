import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import crypto from 'node:crypto';
import { borda, schulze } from '../../shared/preference';
import type { DotVoteResults, PreferenceResults, VoteResults, VoteView } from '../../shared/schemas/voting';
import type { ServerToClientEvents } from '../../shared/events';
import {
  bearer,
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

let t: TestApp;
let workshopId: string;
let sessionId: string;
let facilitator: ClientSocket;
let observer: ClientSocket;
let display: ClientSocket;
let ownerToken: string;
let observerToken: string;
const names = ['Ana Ferreira', 'Ben Okafor', 'Cleo Marsh', 'Dev Patel', 'Eli Novak'];
let phones: ClientSocket[];
let tokens: string[];
let ids: string[];
/** Agenda item index by title. */
const at = new Map<string, number>();

const IMPACT_EFFORT = [
  { id: 'impact', label: 'Impact' },
  { id: 'effort', label: 'Effort' },
];

beforeAll(async () => {
  t = await startTestApp();
  ownerToken = await t.tokenFor('facilitator');
  observerToken = await t.tokenFor('observer');
  workshopId = (await demoWorkshop(t)).id;
  // Two more votes at the end of the day: a preference vote, and a dot vote with stacking off.
  for (const type of ['preference_vote', 'dot_vote']) {
    const res = await t.agent.post(`/api/workshops/${workshopId}/agenda`).set('Authorization', bearer(ownerToken)).send({ type });
    expect(res.status).toBe(201);
  }
  const items = await t.cairn.ctx.db.models.AgendaItem.findAll({ where: { workshopId }, order: [['position', 'ASC']] });
  items.forEach((item, i) => {
    if (!at.has(item.title)) at.set(item.title, i);
  });
  at.set('Preference vote', items.findIndex((i) => i.type === 'preference_vote'));
  at.set('Second dot vote', items.length - 1);

  const info = await startLive(t, ownerToken, workshopId);
  sessionId = info.sessionId;
  facilitator = await t.connect(ownerToken);
  observer = await t.connect(observerToken);
  await commandData(facilitator, 'session:watch', { sessionId });
  await commandData(observer, 'session:watch', { sessionId });
  display = await t.connect(new URL(info.displayUrl).searchParams.get('display')!);
  const joined = await Promise.all(names.map((displayName) => joinLive(t, info.joinCode, { displayName })));
  tokens = joined.map((j) => j.token);
  ids = joined.map((j) => j.me.id);
  phones = await Promise.all(tokens.map((token) => t.connect(token)));
});
afterAll(() => t.close());

/** The facilitator moves to an agenda item by its title. */
async function goto(title: string): Promise<void> {
  const index = at.get(title);
  if (index === undefined || index < 0) throw new Error(`no agenda item '${title}'`);
  await commandData(facilitator, 'session:goto', { index });
}

function cid(): string {
  return crypto.randomUUID();
}

/** One dot from a phone; resolves with the acknowledgement. */
function dot(phone: ClientSocket, optionId: string, criterionId: string, delta: 1 | -1 = 1, clientId = cid()) {
  return command(phone, 'vote:dot', { clientId, optionId, criterionId, delta });
}

/** The events of one kind a socket receives during `ms`. */
async function collect<E extends keyof ServerToClientEvents>(socket: ClientSocket, event: E, ms: number): Promise<Parameters<ServerToClientEvents[E]>[0][]> {
  type Payload = Parameters<ServerToClientEvents[E]>[0];
  const seen: Payload[] = [];
  const listener = (payload: Payload) => seen.push(payload);
  const untyped = socket as unknown as { on(e: string, f: (p: Payload) => void): void; off(e: string, f: (p: Payload) => void): void };
  untyped.on(event, listener);
  await new Promise((r) => setTimeout(r, ms));
  untyped.off(event, listener);
  return seen;
}

function errorCode(answer: { data: unknown } | { error: { code: string } }): string | null {
  return 'error' in answer ? answer.error.code : null;
}

describe('a dot vote with two criteria', () => {
  let vote: VoteView;
  let opt: Record<'dock' | 'unlock' | 'route' | 'helmet', string>;
  let noteId: string;

  beforeAll(async () => {
    // A note from the morning, to promote to an option.
    await goto('What we learned');
    const state = await commandData(phones[0]!, 'session:sync');
    const note = await commandData(phones[0]!, 'submission:create', {
      clientId: cid(),
      itemId: state.item!.id,
      kind: 'note',
      text: 'How might we help a new member find a free dock?',
    });
    noteId = note.id;
    await goto('Pick the challenges');
  });

  it('starts as an empty draft with the plan rules, and only the facilitators may set it up', async () => {
    const draft = await commandData(phones[0]!, 'vote:state');
    expect(draft).toMatchObject({ kind: 'dot_vote', status: 'draft', ready: false, options: [] });
    expect(draft.mine).toEqual({ itemId: draft.itemId, dots: [], ranking: null });
    for (const socket of [phones[0]!, observer, display]) {
      const refused = await command(socket, 'vote:setup', { options: [{ text: 'Anything' }, { text: 'Else' }] });
      expect(errorCode(refused)).toBe('forbidden');
    }
  });

  it('refuses bad set-ups: one option, too many options, overlong text, unknown notes, extra fields', async () => {
    const bad = [
      { options: [{ text: 'Only one' }] },
      { options: Array.from({ length: 31 }, (_, i) => ({ text: `Option ${i}` })) },
      { options: [{ text: 'x'.repeat(301) }, { text: 'y' }] },
      { options: [{ text: 'a', submissionId: noteId }, { text: 'b' }] },
      { options: [{ text: 'a' }, { text: 'b' }], rules: { dotsPerVoter: 0 } },
      { options: [{ text: 'a' }, { text: 'b' }], rules: { rankBy: 'cost' } },
    ];
    for (const payload of bad) expect(errorCode(await command(facilitator, 'vote:setup', payload)), JSON.stringify(payload).slice(0, 80)).toMatch(/validation_failed|bad_request/);
    expect(errorCode(await command(facilitator, 'vote:setup', { options: [{ submissionId: 'no-such-note' }, { text: 'b' }] }))).toBe('bad_request');
  });

  it('suggests the dots per voter from the number of options (shared/tally.ts suggestDotsPerVoter)', async () => {
    // Global Learning Partners, "Dot-mocracy": about a third of the options; Cairn's rule gives 2 for 4–5 options.
    const suggested = await commandData(facilitator, 'vote:setup', {
      options: [{ text: 'One' }, { text: 'Two' }, { text: 'Three' }, { text: 'Four' }],
    });
    expect(suggested.rules.dotsPerVoter).toBe(2);
    expect(suggested.rules.capPerOption).toBe(2);
  });

  it('takes options from a promoted note and typed text, and tells every screen', async () => {
    const heard = nextEvent(display, 'vote:updated', (v) => v.options.length === 4 && v.options[0]!.submissionId === noteId);
    vote = await commandData(facilitator, 'vote:setup', {
      options: [
        { submissionId: noteId },
        { text: 'How might we make unlocking a bike obvious?' },
        { text: 'How might we suggest a calm first route?' },
        { text: 'How might we lend helmets at the dock?' },
      ],
      rules: { dotsPerVoter: 3, capPerOption: 2, allowStacking: true, criteria: IMPACT_EFFORT, topN: 2 },
    });
    expect(vote.options[0]).toMatchObject({ text: 'How might we help a new member find a free dock?', submissionId: noteId });
    // Two criteria rank by their matrix unless the set-up says otherwise (shared/matrix.ts).
    expect(vote.rules).toMatchObject({ dotsPerVoter: 3, capPerOption: 2, allowStacking: true, topN: 2, rankBy: 'matrix' });
    expect((await heard).status).toBe('draft');
    const [dock, unlock, route, helmet] = vote.options.map((o) => o.id);
    opt = { dock: dock!, unlock: unlock!, route: route!, helmet: helmet! };
  });

  it('refuses votes before the vote opens', async () => {
    expect(errorCode(await dot(phones[0]!, opt.dock, 'impact'))).toBe('conflict');
  });

  it('opens, and phones see it open', async () => {
    const heard = nextEvent(phones[1]!, 'vote:updated', (v) => v.status === 'open');
    await commandData(facilitator, 'vote:open');
    expect((await heard).status).toBe('open');
  });

  it('enforces the cap per option and the budget per criterion', async () => {
    const p = phones[0]!;
    expect(errorCode(await dot(p, opt.dock, 'impact'))).toBeNull();
    expect(errorCode(await dot(p, opt.dock, 'impact'))).toBeNull();
    // Cap 2 per option: a third dot on the same option is refused.
    const capped = await dot(p, opt.dock, 'impact');
    expect(errorCode(capped)).toBe('cap_exceeded');
    expect(errorCode(await dot(p, opt.unlock, 'impact'))).toBeNull();
    // Budget 3 per criterion: a fourth impact dot is refused, an effort dot is not.
    expect(errorCode(await dot(p, opt.route, 'impact'))).toBe('budget_exceeded');
    const effort = await dot(p, opt.route, 'effort');
    expect(errorCode(effort)).toBeNull();
    const mine = await commandData(p, 'vote:state');
    expect(mine.mine!.dots.reduce((s, d) => s + (d.criterionId === 'impact' ? d.count : 0), 0)).toBe(3);
    // Unknown options and criteria, and dots that are not there to take back.
    expect(errorCode(await dot(p, 'no-such-option', 'impact'))).toBe('bad_request');
    expect(errorCode(await dot(p, opt.dock, 'cost'))).toBe('bad_request');
    expect(errorCode(await dot(p, opt.helmet, 'impact', -1))).toBe('bad_request');
    expect(errorCode(await command(p, 'vote:dot', { clientId: cid(), optionId: opt.dock, criterionId: 'impact', delta: 2 }))).toBe('validation_failed');
  });

  it('moves a dot: take one back, spend it elsewhere', async () => {
    const p = phones[0]!;
    const back = await commandData(p, 'vote:dot', { clientId: cid(), optionId: opt.unlock, criterionId: 'impact', delta: -1 });
    expect(back.mine.dots.find((d) => d.optionId === opt.unlock && d.criterionId === 'impact')).toBeUndefined();
    const moved = await commandData(p, 'vote:dot', { clientId: cid(), optionId: opt.route, criterionId: 'impact', delta: 1 });
    expect(moved.mine.dots.filter((d) => d.criterionId === 'impact').sort((a, b) => a.optionId.localeCompare(b.optionId))).toEqual(
      [
        { optionId: opt.dock, criterionId: 'impact', count: 2 },
        { optionId: opt.route, criterionId: 'impact', count: 1 },
      ].sort((a, b) => a.optionId.localeCompare(b.optionId)),
    );
  });

  it('applies a retried vote (same clientId) once', async () => {
    const p = phones[1]!;
    const clientId = cid();
    const first = await commandData(p, 'vote:dot', { clientId, optionId: opt.helmet, criterionId: 'impact', delta: 1 });
    const again = await commandData(p, 'vote:dot', { clientId, optionId: opt.helmet, criterionId: 'impact', delta: 1 });
    expect(first.duplicate).toBe(false);
    expect(again.duplicate).toBe(true);
    expect(again.mine.dots).toEqual([{ optionId: opt.helmet, criterionId: 'impact', count: 1 }]);
    // Sent twice at the same moment: still once.
    const twin = cid();
    const both = await Promise.all([dot(p, opt.unlock, 'impact', 1, twin), dot(p, opt.unlock, 'impact', 1, twin)]);
    expect(both.map((a) => ('data' in a ? a.data.duplicate : a.error.code)).sort()).toEqual([false, true]);
    const state = await commandData(p, 'vote:state');
    expect(state.mine!.dots.find((d) => d.optionId === opt.unlock)?.count).toBe(1);
  });

  it('cannot overspend when two phones of the same participant spend the last dot at the same moment', async () => {
    // Phone 2 uses two of its three impact dots, then four sockets with its token race for the last one.
    const p = phones[2]!;
    await commandData(p, 'vote:dot', { clientId: cid(), optionId: opt.unlock, criterionId: 'impact', delta: 1 });
    await commandData(p, 'vote:dot', { clientId: cid(), optionId: opt.route, criterionId: 'impact', delta: 1 });
    const twins = [p, ...(await Promise.all([1, 2, 3].map(() => t.connect(tokens[2]!))))];
    const answers = await Promise.all(
      twins.map((s, i) => dot(s, [opt.dock, opt.helmet, opt.unlock, opt.route][i]!, 'impact')),
    );
    const codes = answers.map(errorCode);
    expect(codes.filter((c) => c === null)).toHaveLength(1);
    expect(codes.filter((c) => c === 'budget_exceeded')).toHaveLength(3);
    const stored = await t.cairn.ctx.db.models.VoteDot.findAll({ where: { participantId: ids[2]!, criterionId: 'impact' } });
    expect(stored.reduce((s, d) => s + d.count, 0)).toBe(3);
    for (const s of twins.slice(1)) s.disconnect();
  });

  it("tells a participant's other phone about their ballot, and not the phone that sent it (its answer has it)", async () => {
    const second = await t.connect(tokens[3]!);
    const heard = nextEvent(second, 'ballot:updated');
    const senderHeard = collect(phones[3]!, 'ballot:updated', 500);
    const answer = await commandData(phones[3]!, 'vote:dot', { clientId: cid(), optionId: opt.dock, criterionId: 'impact', delta: 1 });
    expect(answer.mine.dots).toEqual([{ optionId: opt.dock, criterionId: 'impact', count: 1 }]);
    expect((await heard).dots).toEqual([{ optionId: opt.dock, criterionId: 'impact', count: 1 }]);
    expect(await senderHeard).toEqual([]);
    second.disconnect();
  });

  it('pushes live tallies to the facilitators as votes arrive, and not to phones, the projector or observers before reveal', async () => {
    const tallied = nextEvent(facilitator, 'vote:tallied', (r) => r.kind === 'dot_vote' && r.overall.some((row) => row.optionId === opt.route && row.dots >= 3));
    const phoneHeard = collect(phones[4]!, 'vote:tallied', 800);
    const displayHeard = collect(display, 'vote:tallied', 800);
    const observerHeard = collect(observer, 'vote:tallied', 800);
    await commandData(phones[3]!, 'vote:dot', { clientId: cid(), optionId: opt.route, criterionId: 'effort', delta: 1 });
    const results = (await tallied) as DotVoteResults;
    expect(results.participation.voted).toBe(4);
    expect(await phoneHeard).toEqual([]);
    expect(await displayHeard).toEqual([]);
    expect(await observerHeard).toEqual([]);
  });

  it('keeps the results from phones, the projector and observers until revealed; the facilitators see them any time', async () => {
    for (const socket of [phones[0]!, display, observer]) expect(errorCode(await command(socket, 'vote:results'))).toBe('forbidden');
    const results = await commandData(facilitator, 'vote:results');
    expect(results.kind).toBe('dot_vote');
  });

  it('throttles the tallies under load: a burst of votes gives a few broadcasts a second, the last one complete', async () => {
    // Long enough for the 24 changes one after the other (each waits for its group commit's window,
    // DOT_BATCH_WINDOW_MS in voting.service.ts) and the tally that follows the last.
    const listenMs = 5000;
    const heard = collect(facilitator, 'vote:tallied', listenMs);
    const started = Date.now();
    // Phone 4 spends and takes back its dots quickly: 24 changes.
    for (let i = 0; i < 12; i++) {
      await commandData(phones[4]!, 'vote:dot', { clientId: cid(), optionId: opt.helmet, criterionId: 'effort', delta: 1 });
      await commandData(phones[4]!, 'vote:dot', { clientId: cid(), optionId: opt.helmet, criterionId: 'effort', delta: -1 });
    }
    const elapsed = Date.now() - started;
    expect(elapsed).toBeLessThan(listenMs - 1000);
    const seen = await heard;
    // At most one every 300 ms (server/features/voting TALLY_INTERVAL_MS) while the changes come, plus the leading one and the last.
    expect(seen.length).toBeLessThanOrEqual(Math.ceil(elapsed / 300) + 2);
    expect(seen.length).toBeLessThan(24);
    const last = seen.at(-1) as DotVoteResults;
    expect(last.perCriterion.effort!.find((r) => r.optionId === opt.helmet)!.dots).toBe(0);
  });

  it('stores exactly what a burst acknowledged: dots sent at once from four phones of one person, then all taken back at once', async () => {
    const sockets = [phones[4]!, ...(await Promise.all([1, 2, 3].map(() => t.connect(tokens[4]!))))];
    const storedDots = async () =>
      (await t.cairn.ctx.db.models.VoteDot.findAll({ where: { participantId: ids[4]! } }))
        .map((d) => ({ optionId: d.optionId, criterionId: d.criterionId, count: d.count }))
        .sort((a, b) => `${a.optionId}${a.criterionId}`.localeCompare(`${b.optionId}${b.criterionId}`));
    // Eight dots at once against a budget of 3 per criterion and a cap of 2 per option: six fit.
    const wanted = (['impact', 'effort'] as const).flatMap((criterionId) => [opt.dock, opt.dock, opt.unlock, opt.route].map((optionId) => ({ optionId, criterionId })));
    const spent = await Promise.all(wanted.map((w, i) => dot(sockets[i % 4]!, w.optionId, w.criterionId)));
    const accepted = spent.filter((a) => errorCode(a) === null);
    expect(accepted).toHaveLength(6);
    expect(spent.filter((a) => errorCode(a) === 'budget_exceeded')).toHaveLength(2);
    const mine = await commandData(phones[4]!, 'vote:state');
    const held = mine.mine!.dots.map((d) => ({ ...d })).sort((a, b) => `${a.optionId}${a.criterionId}`.localeCompare(`${b.optionId}${b.criterionId}`));
    expect(held.reduce((s, d) => s + d.count, 0)).toBe(6);
    expect(await storedDots()).toEqual(held);
    // Every dot taken back at once: each take-back finds its dot, and no row is left.
    const back = await Promise.all(held.flatMap((d) => Array.from({ length: d.count }, (_, k) => dot(sockets[k % 4]!, d.optionId, d.criterionId, -1))));
    expect(back.map(errorCode).every((c) => c === null)).toBe(true);
    expect(await storedDots()).toEqual([]);
    for (const s of sockets.slice(1)) s.disconnect();
  });

  it('pushes a tally equal to the one counted from the stored rows, after a burst of dots spent and taken back', async () => {
    // The pushes count from the dot path's memory of what each group commit stored; `vote:results` reads the file.
    const sockets = [phones[0]!, phones[1]!, phones[2]!, phones[4]!];
    await Promise.all(sockets.map((s) => dot(s, opt.unlock, 'impact')));
    await Promise.all([dot(phones[4]!, opt.unlock, 'impact', -1), dot(phones[0]!, opt.route, 'effort'), dot(phones[1]!, opt.route, 'effort')]);
    const heard = collect(facilitator, 'vote:tallied', 1000);
    await dot(phones[2]!, opt.unlock, 'impact', -1);
    const last = (await heard).at(-1) as DotVoteResults;
    const fromFile = (await commandData(facilitator, 'vote:results')) as DotVoteResults;
    expect(last.perCriterion).toEqual(fromFile.perCriterion);
    expect(last.overall).toEqual(fromFile.overall);
    expect(last.participation).toEqual(fromFile.participation);
    expect(last.top).toEqual(fromFile.top);
  });

  it('refuses votes while input is locked', async () => {
    await commandData(facilitator, 'session:lock', { locked: true });
    expect(errorCode(await dot(phones[4]!, opt.dock, 'impact'))).toBe('input_locked');
    await commandData(facilitator, 'session:lock', { locked: false });
  });

  it('lets phones neither open, close, reveal, choose nor see the sources', async () => {
    for (const [event, payload] of [
      ['vote:open', {}],
      ['vote:close', {}],
      ['session:reveal', { revealed: true }],
      ['vote:choose', { optionIds: [opt.dock] }],
      ['vote:sources', {}],
      ['teams:propose', {}],
    ] as const) {
      expect(errorCode(await command(phones[1]!, event, payload)), event).toBe('forbidden');
      expect(errorCode(await command(observer, event, payload)), event).toBe('forbidden');
    }
  });

  it('observers watch the vote but cannot run it or vote', async () => {
    const watched = await commandData(observer, 'vote:state');
    expect(watched.status).toBe('open');
    expect(watched.mine).toBeNull();
    expect(errorCode(await dot(observer, opt.dock, 'impact'))).toBe('forbidden');
  });

  it('refuses votes once closed; a retry of an applied vote still answers as applied', async () => {
    const clientId = cid();
    await commandData(phones[4]!, 'vote:dot', { clientId, optionId: opt.dock, criterionId: 'impact', delta: 1 });
    const heard = nextEvent(phones[4]!, 'vote:updated', (v) => v.status === 'closed');
    await commandData(facilitator, 'vote:close');
    await heard;
    expect(errorCode(await dot(phones[4]!, opt.unlock, 'impact'))).toBe('conflict');
    expect(errorCode(await dot(phones[0]!, opt.dock, 'impact', -1))).toBe('conflict');
    const retry = await commandData(phones[4]!, 'vote:dot', { clientId, optionId: opt.dock, criterionId: 'impact', delta: 1 });
    expect(retry.duplicate).toBe(true);
  });

  it('ranks per criterion and overall with standard competition ranks, flags ties, and places the options on the matrix', async () => {
    const r = (await commandData(facilitator, 'vote:results')) as DotVoteResults;
    const byOption = (rows: DotVoteResults['overall']) => Object.fromEntries(rows.map((row) => [row.optionId, row]));
    // Impact dots cast above: dock 2+1+1(ph3)+1(ph4)=... counted from the stored rows, the independent reference here.
    const stored = await t.cairn.ctx.db.models.VoteDot.findAll();
    const count = (optionId: string, criterionId?: string) =>
      stored.filter((d) => d.optionId === optionId && (!criterionId || d.criterionId === criterionId)).reduce((s, d) => s + d.count, 0);
    for (const o of Object.values(opt)) {
      expect(byOption(r.overall)[o]!.dots).toBe(count(o));
      expect(byOption(r.perCriterion.impact!)[o]!.dots).toBe(count(o, 'impact'));
      expect(byOption(r.perCriterion.effort!)[o]!.dots).toBe(count(o, 'effort'));
    }
    // Standard competition ranking ("1224", Wikipedia "Ranking"): 1 + the number of options with more dots.
    for (const row of r.overall) expect(row.rank).toBe(1 + r.overall.filter((x) => x.dots > row.dots).length);
    expect(r.matrix).not.toBeNull();
    expect(r.matrix!.yCriterionId).toBe('impact');
    expect(r.matrix!.xCriterionId).toBe('effort');
    for (const p of r.matrix!.points) {
      expect(p.y).toBe(count(p.optionId, 'impact'));
      expect(p.x).toBe(count(p.optionId, 'effort'));
    }
    expect(r.participation).toMatchObject({ voters: 5, voted: 5 });
    expect(r.top.selected.length + r.top.tiedAtCutoff.length).toBeGreaterThanOrEqual(Math.min(2, r.options.length));
  });

  it('carries the top N forward by the tie policy, and the phones and projector may see the results once revealed', async () => {
    const r = (await commandData(facilitator, 'vote:results')) as DotVoteResults;
    const outsider = r.overall.find((row) => !r.top.selected.includes(row.optionId) && !r.top.tiedAtCutoff.includes(row.optionId));
    if (outsider) {
      const wrong = await command(facilitator, 'vote:choose', { optionIds: [outsider.optionId, ...r.top.selected, ...r.top.tiedAtCutoff].slice(0, 2) });
      expect(errorCode(wrong)).toBe('bad_request');
    }
    const pick = [...r.top.selected, ...r.top.tiedAtCutoff].slice(0, 2);
    const chosen = await commandData(facilitator, 'vote:choose', { optionIds: pick });
    expect(new Set(chosen.chosen)).toEqual(new Set(pick));

    const revealedToPhone = nextEvent(phones[0]!, 'session:updated', (s) => s.revealed);
    await commandData(facilitator, 'session:reveal', { revealed: true });
    await revealedToPhone;
    for (const socket of [phones[0]!, display, observer]) expect((await commandData(socket, 'vote:results')).kind).toBe('dot_vote');
  });

  it('lists the carried-forward options as sources for a later vote', async () => {
    const sources = await commandData(facilitator, 'vote:sources');
    expect(sources.notes.some((n) => n.submissionId === noteId)).toBe(true);
    expect(sources.winners).toHaveLength(1);
    expect(sources.winners[0]!.itemTitle).toBe('Pick the challenges');
    expect(sources.winners[0]!.texts).toHaveLength(2);
  });

  it('gives observers the vote over HTTP, and phones nothing', async () => {
    const res = await t.agent.get(`/api/workshops/${workshopId}/votes`).set('Authorization', bearer(observerToken));
    expect(res.status).toBe(200);
    const list = res.body as VoteResults[];
    expect(list.map((v) => v.itemTitle)).toContain('Pick the challenges');
    const phoneTry = await t.agent.get(`/api/workshops/${workshopId}/votes`).set('Authorization', bearer(tokens[0]!));
    expect(phoneTry.status).toBe(401);
  });
});

describe('a dot vote with stacking off', () => {
  it('allows one dot per option', async () => {
    await goto('Second dot vote');
    const vote = await commandData(facilitator, 'vote:setup', {
      options: [{ text: 'Lights' }, { text: 'Bells' }, { text: 'Baskets' }],
      rules: { dotsPerVoter: 2, allowStacking: false, topN: 1 },
    });
    await commandData(facilitator, 'vote:open');
    const [a, b] = vote.options.map((o) => o.id);
    expect(errorCode(await dot(phones[0]!, a!, 'overall'))).toBeNull();
    expect(errorCode(await dot(phones[0]!, a!, 'overall'))).toBe('cap_exceeded');
    expect(errorCode(await dot(phones[0]!, b!, 'overall'))).toBeNull();
    // A set-up cannot change under votes already cast.
    expect(errorCode(await command(facilitator, 'vote:choose', { optionIds: [a!] }))).toBe('conflict');
    await commandData(facilitator, 'vote:close');
    expect(errorCode(await command(facilitator, 'vote:setup', { options: [{ text: 'New' }, { text: 'Other' }] }))).toBe('conflict');
  });

  it('leaves a tie at the cut-off to the facilitator, who breaks it by picking one of the tied options', async () => {
    const r = (await commandData(facilitator, 'vote:results')) as DotVoteResults;
    const [lights, bells, baskets] = r.options.map((o) => o.id) as [string, string, string];
    // Lights 1, Bells 1, Baskets 0 for a top 1: ranks 1, 1, 3 ("1224" ranking), and neither tied option is selected alone.
    expect(r.overall.map((row) => [row.optionId, row.dots, row.rank, row.tied])).toEqual([
      [lights, 1, 1, true],
      [bells, 1, 1, true],
      [baskets, 0, 3, false],
    ]);
    expect(r.top).toMatchObject({ selected: [], tiedAtCutoff: [lights, bells] });
    expect(r.top.policy).toMatch(/tie/);
    expect(errorCode(await command(facilitator, 'vote:choose', { optionIds: [baskets] }))).toBe('bad_request');
    expect(errorCode(await command(facilitator, 'vote:choose', { optionIds: [lights, bells] }))).toBe('bad_request');
    expect((await commandData(facilitator, 'vote:choose', { optionIds: [bells] })).chosen).toEqual([bells]);
  });
});

describe('a preference vote', () => {
  it('counts the orders by Borda and by Schulze, with the pairwise table', async () => {
    await goto('Preference vote');
    const vote = await commandData(facilitator, 'vote:setup', {
      options: [{ text: 'Route cards' }, { text: 'Ride buddies' }, { text: 'Dock maps' }],
    });
    await commandData(facilitator, 'vote:open');
    const [A, B, C] = vote.options.map((o) => o.id) as [string, string, string];
    const orders = [
      [A, B, C],
      [A, B, C],
      [A, B, C],
      [B, C, A],
      [B, C, A],
    ];
    await Promise.all(orders.map((ranking, i) => commandData(phones[i]!, 'vote:rank', { clientId: cid(), ranking })));
    // A changed mind replaces the earlier order; the same order retried is applied once.
    const again = cid();
    await commandData(phones[4]!, 'vote:rank', { clientId: again, ranking: [B, A, C] });
    await commandData(phones[4]!, 'vote:rank', { clientId: cid(), ranking: [B, C, A] });
    expect((await commandData(phones[4]!, 'vote:rank', { clientId: again, ranking: [B, A, C] })).mine.ranking).toEqual([B, C, A]);
    expect(errorCode(await command(phones[0]!, 'vote:rank', { clientId: cid(), ranking: [A, A] }))).toBe('bad_request');
    expect(errorCode(await command(phones[0]!, 'vote:dot', { clientId: cid(), optionId: A, criterionId: 'overall', delta: 1 }))).toBe('bad_request');

    const r = (await commandData(facilitator, 'vote:results')) as PreferenceResults;
    // Borda count (Wikipedia, "Borda count"): n−1 … 0 points per place. By hand: A 3×2 = 6; B 3×1 + 2×2 = 7; C 2×1 = 2.
    expect(Object.fromEntries(r.borda.map((row) => [row.optionId, row.points]))).toEqual({ [A]: 6, [B]: 7, [C]: 2 });
    expect(r.borda.map((row) => row.optionId)).toEqual([B, A, C]);
    // Pairwise table by hand: A over B 3, B over A 2; A over C 3, C over A 2; B over C 5, C over B 0.
    expect(r.schulze.pairwise).toEqual([
      [0, 3, 3],
      [2, 0, 5],
      [2, 0, 0],
    ]);
    // A beats both others head to head (the Condorcet winner), which the Schulze method always ranks first (Schulze 2011).
    expect(r.schulze.ranking.map((row) => row.optionId)).toEqual([A, B, C]);
    // And the server agrees with the shared computations on the stored ballots.
    const ballots = orders.map((ranking) => ({ ranking }));
    expect(r.borda).toEqual(borda([A, B, C], ballots));
    expect(r.schulze).toEqual(schulze([A, B, C], ballots));
    expect(r.participation).toMatchObject({ voted: 5, voters: 5, dotsLeft: null });
    // The top N follows the chosen method (Schulze by default).
    expect(r.top.selected).toEqual([A, B, C].slice(0, Math.min(3, r.rules.topN)));
  });
});

describe('a team sort', () => {
  it('assigns everyone to the challenges with sizes differing by at most one, and confirming tells every phone its team', async () => {
    await goto('Form the teams');
    const vote = await commandData(facilitator, 'vote:setup', {
      options: [{ text: 'How might we help a new member find a free dock?' }, { text: 'How might we make unlocking a bike obvious?' }],
    });
    await commandData(facilitator, 'vote:open');
    const [dock, unlock] = vote.options.map((o) => o.id) as [string, string];
    // Four want the dock challenge first, one the unlocking one.
    await Promise.all(
      phones.map((p, i) => commandData(p, 'vote:rank', { clientId: cid(), ranking: i === 4 ? [unlock, dock] : [dock, unlock] })),
    );
    const progress = (await commandData(facilitator, 'vote:results')) as VoteResults;
    expect(progress.kind === 'team_sort' && progress.firstChoices).toEqual({ [dock]: 4, [unlock]: 1 });
    await commandData(facilitator, 'vote:close');

    const proposal = await commandData(facilitator, 'teams:propose');
    const sizes = proposal.teams.map((team) => team.memberIds.length);
    expect(Math.max(...sizes) - Math.min(...sizes)).toBeLessThanOrEqual(1);
    expect(sizes.reduce((a, b) => a + b, 0)).toBe(5);
    expect(new Set(proposal.teams.flatMap((team) => team.memberIds))).toEqual(new Set(ids));
    // Sizes 3 and 2: the dock team takes three of the four who wanted it; the least cost is 1 (one second choice).
    expect(proposal.cost).toBe(1);
    expect(proposal.outcome.find((o) => o.participantId === ids[4])).toMatchObject({ optionId: unlock, choice: 1 });
    expect(proposal.outcome.filter((o) => o.choice === 2)).toHaveLength(1);

    // The facilitator's largest team size holds; one too small for the room is refused in words.
    const capped = await commandData(facilitator, 'teams:propose', { maxTeamSize: 3 });
    expect(Math.max(...capped.teams.map((team) => team.memberIds.length))).toBe(3);
    expect(capped.cost).toBe(1);
    const tooSmall = await command(facilitator, 'teams:propose', { maxTeamSize: 2 });
    expect(errorCode(tooSmall)).toBe('bad_request');
    expect(JSON.stringify(tooSmall)).toContain('5 people do not fit in 2 teams of at most 2');
    expect(errorCode(await command(facilitator, 'teams:propose', { maxTeamSize: 0 }))).toBe('validation_failed');
    expect(errorCode(await command(facilitator, 'teams:propose', { maxTeamSize: Number.NaN }))).toBe('validation_failed');

    const heard = Promise.all(phones.map((p) => nextEvent(p, 'teams:updated')));
    await commandData(facilitator, 'teams:set', {
      teams: proposal.teams.map((team, i) => ({ name: `Team ${i + 1}`, challenge: team.challenge, memberIds: team.memberIds })),
    });
    const seen = await heard;
    for (const [i, teams] of seen.entries()) {
      const mine = teams.find((team) => team.members.some((m) => m.id === ids[i]));
      expect(mine?.challenge).toMatch(/^How might we/);
    }
    const me = await commandData(phones[4]!, 'participant:me');
    expect(seen[4]!.find((team) => team.id === me.teamId)?.challenge).toBe('How might we make unlocking a bike obvious?');
  });
});
