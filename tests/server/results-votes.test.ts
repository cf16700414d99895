import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import { bearer, commandData, liveDay, startTestApp, type LiveDay, type TestApp } from './helpers';
import { WorkshopResults, type ResultSection } from '../../shared/schemas/results';

let t: TestApp;
let day: LiveDay;
let r: WorkshopResults;

const CRITERIA = [
  { id: 'impact', label: 'Impact' },
  { id: 'effort', label: 'Effort' },
];

beforeAll(async () => {
  t = await startTestApp();
  day = await liveDay(t, {
    title: 'Harbour Lane: votes',
    phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }, { displayName: 'Chidi Brandt' }],
    notes: [],
    stop: false,
  });
  // A preference vote added to the plan during the day.
  const added = await t.agent.post(`/api/workshops/${day.workshopId}/agenda`).set('Authorization', bearer(day.ownerToken)).send({ type: 'preference_vote' });
  expect(added.status, JSON.stringify(added.body)).toBe(201);
  const agenda = (await t.agent.get(`/api/workshops/${day.workshopId}`).set('Authorization', bearer(day.ownerToken))).body.agenda as { id: string; type: string }[];
  const phone = (i: number) => day.phones[i]!.socket;

  // Dot vote on two criteria, three dots per voter and criterion.
  await commandData(day.owner, 'session:goto', { index: agenda.findIndex((i) => i.type === 'dot_vote') });
  const dotVote = await commandData(day.owner, 'vote:setup', {
    options: ['Clear unlock steps', 'A welcome ride', 'Dock maps', 'Helmet lending'].map((text) => ({ text })),
    rules: { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, criteria: CRITERIA, topN: 2, rankBy: 'overall' },
  });
  await commandData(day.owner, 'vote:open', {});
  const [A, B, C, D] = dotVote.options.map((o) => o.id);
  const dots: [number, string, string][] = [
    // Impact: A 3, B 3, C 2, D 1.
    [0, A!, 'impact'], [0, A!, 'impact'], [0, B!, 'impact'],
    [1, A!, 'impact'], [1, C!, 'impact'], [1, C!, 'impact'],
    [2, B!, 'impact'], [2, B!, 'impact'], [2, D!, 'impact'],
    // Effort: B 1, C 1, D 1.
    [0, D!, 'effort'], [1, B!, 'effort'], [2, C!, 'effort'],
  ];
  for (const [who, optionId, criterionId] of dots) {
    await commandData(phone(who), 'vote:dot', { clientId: `dot-${crypto.randomUUID()}`, optionId, criterionId, delta: 1 });
  }
  await commandData(day.owner, 'vote:close', {});

  // Preference vote: three voters put three options in order.
  await commandData(day.owner, 'session:goto', { index: agenda.findIndex((i) => i.type === 'preference_vote') });
  const pref = await commandData(day.owner, 'vote:setup', {
    options: ['Ride buddies', 'Route cards', 'Night lights'].map((text) => ({ text })),
    rules: { method: 'schulze', topN: 1 },
  });
  await commandData(day.owner, 'vote:open', {});
  const [X, Y, Z] = pref.options.map((o) => o.id);
  for (const [who, ranking] of [[0, [X, Y, Z]], [1, [Y, Z, X]], [2, [X, Z, Y]]] as const) {
    await commandData(phone(who), 'vote:rank', { clientId: `rank-${crypto.randomUUID()}`, ranking });
  }
  // Left open on purpose: ending the session closes it, and its ballots are in the results.
  await t.agent.post(`/api/workshops/${day.workshopId}/live/stop`).set('Authorization', bearer(day.ownerToken));
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results`).set('Authorization', bearer(day.ownerToken));
  expect(res.status).toBe(200);
  r = WorkshopResults.parse(res.body);
});
afterAll(() => t?.close());

function votes(type: string): Extract<ResultSection, { kind: 'votes' }> {
  const s = r.activities.find((a) => a.type === type)!.sections.find((x) => x.kind === 'votes');
  expect(s, `${type} has vote results`).toBeDefined();
  return s as Extract<ResultSection, { kind: 'votes' }>;
}

async function csv(file: string): Promise<string[][]> {
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/exports/${file}`).set('Authorization', bearer(await t.tokenFor('observer')));
  expect(res.status).toBe(200);
  expect(res.text.endsWith('\r\n')).toBe(true);
  return parse(res.text, { record_delimiter: '\r\n' }) as string[][];
}

describe('vote results on the results page', () => {
  it('ranks a dot vote with standard competition ranking ("1224") and flags the ties', () => {
    const v = votes('dot_vote');
    expect(v.method).toBe('dots');
    expect(v.rankedBy).toBe('All criteria together');
    // Overall = impact + effort: B 4, A 3, C 3, D 2 → ranks 1, 2, 2, 4.
    expect(v.overall.map((o) => [o.label, o.score, o.rank, o.tied])).toEqual([
      ['A welcome ride', 4, 1, false],
      ['Clear unlock steps', 3, 2, true],
      ['Dock maps', 3, 2, true],
      ['Helmet lending', 2, 4, false],
    ]);
    expect(v.tables.map((tb) => [tb.label, tb.rows.map((o) => `${o.label}:${o.score}:${o.rank}`)])).toEqual([
      ['Impact', ['Clear unlock steps:3:1', 'A welcome ride:3:1', 'Dock maps:2:3', 'Helmet lending:1:4']],
      ['Effort', ['A welcome ride:1:1', 'Dock maps:1:1', 'Helmet lending:1:1', 'Clear unlock steps:0:4']],
    ]);
    expect([v.voters, v.voted, v.open]).toEqual([3, 3, false]);
  });

  it('carries the top 2 forward with the stated tie policy: the tie across the cut-off is left to the facilitator', () => {
    const v = votes('dot_vote');
    expect(v.overall.filter((o) => o.selected).map((o) => o.label)).toEqual(['A welcome ride']);
    expect(v.tiedAtCutoff).toEqual(['Clear unlock steps', 'Dock maps']);
    expect(v.tiePolicy).toMatch(/tied across the cut-off are left to the facilitator/);
    // The same line as numbers, for the results page to word in its language: one of the top 2 is open, two options tie for it.
    expect(v.tie).toEqual({ places: 2, open: 1, count: 2, unvoted: false });
  });

  it('plots the criteria matrix: impact up, effort across', () => {
    const v = votes('dot_vote');
    expect(v.matrix).toEqual({
      xLabel: 'Effort',
      yLabel: 'Impact',
      xMeans: 'high',
      yMeans: 'high',
      // In the matrix's order (shared/matrix.ts; high impact and low effort first, common practice). These criteria
      // set no direction, so a dot means "high" on both: most impact 3 (split 1.5), most effort 1 (split 0.5).
      points: [
        { optionId: expect.any(String), label: 'Clear unlock steps', x: 0, y: 3, quadrant: 'Impact high · Effort low', levels: { y: 'high', x: 'low' } },
        { optionId: expect.any(String), label: 'A welcome ride', x: 1, y: 3, quadrant: 'Impact high · Effort high', levels: { y: 'high', x: 'high' } },
        { optionId: expect.any(String), label: 'Dock maps', x: 1, y: 2, quadrant: 'Impact high · Effort high', levels: { y: 'high', x: 'high' } },
        { optionId: expect.any(String), label: 'Helmet lending', x: 1, y: 1, quadrant: 'Impact low · Effort high', levels: { y: 'low', x: 'high' } },
      ],
    });
  });

  it('closes a vote left open when the session ends, so it is final and whole in the results', () => {
    expect(votes('preference_vote').open).toBe(false);
  });

  it('gives a preference vote by the chosen method, the other method and the pairwise table', () => {
    const v = votes('preference_vote');
    // By hand from the ballots X>Y>Z, Y>Z>X, X>Z>Y: X beats Y 2–1 and Z 2–1, Y beats Z 2–1 (a Condorcet order);
    // Borda with n−1 … 0 points: X 2+0+2 = 4, Y 1+2+0 = 3, Z 0+1+1 = 2.
    expect(v.method).toBe('schulze');
    expect(v.rankedBy).toBe('Head-to-head');
    expect(v.overall.map((o) => [o.label, o.rank, o.selected])).toEqual([
      ['Ride buddies', 1, true],
      ['Route cards', 2, false],
      ['Night lights', 3, false],
    ]);
    expect(v.tables[0]!.label).toBe('Points by place');
    expect(v.tables[0]!.rows.map((o) => [o.label, o.score, o.rank])).toEqual([
      ['Ride buddies', 4, 1],
      ['Route cards', 3, 2],
      ['Night lights', 2, 3],
    ]);
    expect(v.pairwise).toEqual({ labels: ['Ride buddies', 'Route cards', 'Night lights'], d: [[0, 2, 2], [1, 0, 2], [1, 1, 0]] });
  });
});

describe('vote exports', () => {
  it('writes every ranking line to the tallies CSV, read back field by field with csv-parse', async () => {
    const [header, ...rows] = await csv('tallies.csv');
    expect(header).toEqual(['Session', 'Activity number', 'Activity', 'Method', 'Ranked by', 'Option', 'Score', 'Rank', 'Tied', 'Near tie', 'Selected', 'Matrix quadrant']);
    const expected = (['dot_vote', 'preference_vote'] as const).flatMap((type) => {
      const v = votes(type);
      const a = r.activities.find((x) => x.type === type)!;
      return [{ label: v.rankedBy, rows: v.overall }, ...v.tables].flatMap((block) =>
        block.rows.map((o) => [v.session!, String(a.position), a.title, v.method, block.label, o.label, String(o.score), String(o.rank), o.tied ? 'yes' : 'no', o.nearTie ? 'yes' : 'no', o.selected ? 'yes' : 'no', o.quadrant ?? '']),
      );
    });
    expect(rows).toEqual(expected);
  });

  it('writes every dot and every place in a ranking to the votes CSV', async () => {
    const [header, ...all] = await csv('votes.csv');
    expect(header).toEqual(['Session', 'Activity number', 'Activity', 'Voter', 'Option', 'Criterion', 'Value']);
    // Every row names its session; the rest of the row is read as before.
    expect(new Set(all.map((row) => row[0]))).toEqual(new Set([r.sessions.find((s) => s.included)!.name]));
    const rows = all.map((row) => row.slice(1));
    const dots = rows.filter((row) => row[4] !== 'Place in ranking');
    const total = (criterion: string) => dots.filter((row) => row[4] === criterion).reduce((n, row) => n + Number(row[5]), 0);
    expect([total('Impact'), total('Effort')]).toEqual([9, 3]);
    expect(dots.find((row) => row[2] === 'Ana Lima' && row[3] === 'Clear unlock steps')).toEqual([expect.any(String), 'Pick the challenges', 'Ana Lima', 'Clear unlock steps', 'Impact', '2']);
    const places = rows.filter((row) => row[4] === 'Place in ranking' && row[2] === 'Ben Okafor').map((row) => [row[3], row[5]]);
    expect(places).toEqual([
      ['Route cards', '1'],
      ['Night lights', '2'],
      ['Ride buddies', '3'],
    ]);
  });
});
