import crypto from 'node:crypto';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { parse } from 'csv-parse/sync';
import * as pdfjs from 'pdfjs-dist/legacy/build/pdf.mjs';
import { bearer, commandData, liveDay, startTestApp, type LiveDay, type TestApp } from './helpers';
import { contributionsText, WorkshopResults, type ResultSection } from '../../shared/schemas/results';
import { IMPACT_EFFORT_CRITERIA } from '../../shared/activities';
import type { DotVoteResults } from '../../shared/schemas/voting';

// A dot vote on impact and effort: the room's result is the matrix, high impact and low effort first
// (common practice, CHECKS.md), never effort dots added to impact dots. Counts worked by hand below.
let t: TestApp;
let day: LiveDay;
let r: WorkshopResults;
let live: DotVoteResults;

beforeAll(async () => {
  t = await startTestApp();
  day = await liveDay(t, {
    title: 'Harbour Lane: two criteria',
    phones: [{ displayName: 'Ana Lima' }, { displayName: 'Ben Okafor' }, { displayName: 'Chidi Brandt' }],
    notes: [],
    stop: false,
  });
  const index = day.agenda.findIndex((i) => i.type === 'dot_vote');
  await commandData(day.owner, 'session:goto', { index });
  // No rankBy given: two criteria rank by their matrix.
  const vote = await commandData(day.owner, 'vote:setup', {
    options: ['Longer unlock guide', 'A sticker on each dock', 'A welcome ride'].map((text) => ({ text })),
    rules: { dotsPerVoter: 3, capPerOption: 3, allowStacking: true, criteria: [...IMPACT_EFFORT_CRITERIA], topN: 2 },
  });
  expect(vote.rules.rankBy).toBe('matrix');
  expect(vote.rules.criteria[1]).toMatchObject({ label: 'Effort', hint: 'a dot for each idea that would be easy to do', dotMeans: 'low' });
  await commandData(day.owner, 'vote:open', {});
  const [P, Q, R] = vote.options.map((o) => o.id);
  // Impact: P 4, R 4, Q 1. Effort (a dot = easy to do): Q 5, R 4, P 0.
  const dots: [number, string, 'impact' | 'effort'][] = [
    [0, P!, 'impact'], [0, P!, 'impact'], [0, R!, 'impact'],
    [1, P!, 'impact'], [1, P!, 'impact'], [1, R!, 'impact'],
    [2, R!, 'impact'], [2, R!, 'impact'], [2, Q!, 'impact'],
    [0, Q!, 'effort'], [0, Q!, 'effort'], [0, R!, 'effort'],
    [1, Q!, 'effort'], [1, Q!, 'effort'], [1, R!, 'effort'],
    [2, Q!, 'effort'], [2, R!, 'effort'], [2, R!, 'effort'],
  ];
  for (const [who, optionId, criterionId] of dots) {
    await commandData(day.phones[who]!.socket, 'vote:dot', { clientId: `dot-${crypto.randomUUID()}`, optionId, criterionId, delta: 1 });
  }
  await commandData(day.owner, 'vote:close', {});
  live = (await commandData(day.owner, 'vote:results', {})) as DotVoteResults;
  const res = await t.agent.get(`/api/workshops/${day.workshopId}/results`).set('Authorization', bearer(day.ownerToken));
  expect(res.status).toBe(200);
  r = WorkshopResults.parse(res.body);
});
afterAll(() => t?.close());

function section(): Extract<ResultSection, { kind: 'votes' }> {
  return r.activities.find((a) => a.type === 'dot_vote')!.sections.find((s) => s.kind === 'votes') as Extract<ResultSection, { kind: 'votes' }>;
}

describe('a dot vote on impact and effort', () => {
  it('ranks by the matrix on the console and projector: high impact and low effort first, not by the sum', () => {
    // Sum would be R 8, Q 6, P 4 (the easy, low-impact sticker above the big guide). Matrix: most impact 4 (split 2):
    // P, R high, Q low; most "easy" dots 5 (split 2.5): Q, R easy (effort low), P effort high.
    // → R (high, low), P (high, high), Q (low, low).
    const text = (id: string) => live.options.find((o) => o.id === id)!.text;
    expect(live.ranked.map((row) => [text(row.optionId), row.rank])).toEqual([
      ['A welcome ride', 1],
      ['Longer unlock guide', 2],
      ['A sticker on each dock', 3],
    ]);
    expect(live.top.selected.map(text)).toEqual(['A welcome ride', 'Longer unlock guide']);
    expect(live.matrix!.points.map((p) => [text(p.optionId), p.yLevel, p.xLevel])).toEqual([
      ['A welcome ride', 'high', 'low'],
      ['Longer unlock guide', 'high', 'high'],
      ['A sticker on each dock', 'low', 'low'],
    ]);
  });

  it('gives the results page the same ranking, with quadrants, and "carried forward" only there', () => {
    const v = section();
    expect(v.rankedBy).toBe('The matrix: Impact high and Effort low first');
    expect(v.scoreLabel).toBe('Impact dots');
    expect(v.overall.map((o) => [o.label, o.score, o.rank, o.quadrant, o.selected])).toEqual([
      ['A welcome ride', 4, 1, 'Impact high · Effort low', true],
      ['Longer unlock guide', 4, 2, 'Impact high · Effort high', true],
      ['A sticker on each dock', 1, 3, 'Impact low · Effort low', false],
    ]);
    // The per-criterion tables stay, with no sum of effort and impact beside the matrix, and no "carried forward".
    expect(v.tables.map((tb) => tb.label)).toEqual(['Impact', 'Effort']);
    for (const table of v.tables) expect(table.rows.some((row) => row.selected), table.label).toBe(false);
    expect(v.matrix!.points.map((p) => p.quadrant)).toEqual(['Impact high · Effort low', 'Impact high · Effort high', 'Impact low · Effort low']);
    // A dot on effort means "easy to do": the plot runs effort the other way from the dots (shared/matrix.ts plotPosition).
    expect(v.matrix).toMatchObject({ xMeans: 'low', yMeans: 'high' });
  });

  it('writes the same ranking and quadrants to the tallies CSV', async () => {
    const res = await t.agent.get(`/api/workshops/${day.workshopId}/exports/tallies.csv`).set('Authorization', bearer(day.ownerToken));
    const [header, ...rows] = parse(res.text, { record_delimiter: '\r\n' }) as string[][];
    const at = (name: string) => header!.indexOf(name);
    const main = rows.filter((row) => row[at('Ranked by')] === 'The matrix: Impact high and Effort low first');
    expect(main.map((row) => [row[at('Option')], row[at('Rank')], row[at('Selected')], row[at('Matrix quadrant')]])).toEqual([
      ['A welcome ride', '1', 'yes', 'Impact high · Effort low'],
      ['Longer unlock guide', '2', 'yes', 'Impact high · Effort high'],
      ['A sticker on each dock', '3', 'no', 'Impact low · Effort low'],
    ]);
    expect(rows.filter((row) => row[at('Ranked by')] !== main[0]![at('Ranked by')]).every((row) => row[at('Selected')] === 'no')).toBe(true);
  });

  it('prints the same ranking in the PDF report (read back with PDF.js)', async () => {
    const res = await t.agent
      .get(`/api/workshops/${day.workshopId}/report.pdf`)
      .set('Authorization', bearer(day.ownerToken))
      .buffer(true)
      .parse((stream, done) => {
        const chunks: Buffer[] = [];
        stream.on('data', (c: Buffer) => chunks.push(c));
        stream.on('end', () => done(null, Buffer.concat(chunks)));
      });
    const doc = await pdfjs.getDocument({ data: new Uint8Array(res.body as Buffer), useSystemFonts: false, isEvalSupported: false }).promise;
    let text = '';
    for (let i = 1; i <= doc.numPages; i++) {
      const content = await (await doc.getPage(i)).getTextContent();
      text += content.items.map((item) => ('str' in item ? item.str + ' ' : '')).join('');
    }
    await doc.destroy();
    text = text.replace(/\s+/g, ' ');
    expect(text).toContain('The matrix: Impact high and Effort low first');
    const order = ['A welcome ride', 'Longer unlock guide', 'A sticker on each dock'].map((label) => text.indexOf(label));
    expect(order.every((at, i) => at >= 0 && (i === 0 || at > order[i - 1]!))).toBe(true);
    expect(text).toContain('Impact high · Effort low');
  });

  it("names the vote's own budget in the results' prompt (3 dots), as the phones showed it", () => {
    const a = r.activities.find((x) => x.type === 'dot_vote')!;
    expect(a.prompt).toMatch(/3 dots/);
  });

  it('counts the vote as ballots in the participation table, not as "0 notes"', () => {
    const title = day.agenda.find((i) => i.type === 'dot_vote')!.title;
    const row = r.participation.perActivity.find((p) => p.title === title)!;
    expect(row).toMatchObject({ contributors: 3, notes: 0, ballots: 3, rate: 1 });
    expect(contributionsText(row)).toBe('3 ballots');
    const insights = { notes: 2, ballots: null };
    expect(contributionsText(insights)).toBe('2 notes');
  });
});
