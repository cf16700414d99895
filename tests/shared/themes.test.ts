import { describe, expect, it } from 'vitest';
import { stemmer } from 'stemmer';
import { suggestThemes, tokenize, type ThemeNote } from '../../shared/themes';
import { mulberry32 } from './random';

/**
 * Insight notes from the invented demo scenario, "Harbour Lane Bike Co-op": a new member's first
 * ride. Invented data: the expected groups and their labels below were assigned by hand for this
 * test (no published reference exists for this grouping).
 */
const firstRide: ThemeNote[] = [
  { id: 'u1', text: 'The app would not unlock the bike at first' },
  { id: 'u2', text: 'Unlocking took three tries in the app' },
  { id: 'u3', text: "I didn't know the app needed Bluetooth to unlock" },
  { id: 'h1', text: 'No helmet at the dock, so I rode without one' },
  { id: 'h2', text: 'The helmet was too big for me' },
  { id: 'h3', text: 'Where do I leave the helmet after my ride?' },
  { id: 's1', text: "Couldn't work out how to raise the saddle" },
  { id: 's2', text: 'Saddle height lever is stiff' },
  { id: 's3', text: 'Saddle was too low and my knees hurt' },
  { id: 'd1', text: 'Took ages to find a free dock near the harbour' },
  { id: 'd2', text: 'Docking station was full when I arrived' },
  { id: 'd3', text: 'Not sure the bike was locked into the dock' },
  { id: 'm1', text: 'The route map on the app is hard to read in sunlight' },
  { id: 'm2', text: 'Map did not show the cycle lanes' },
  { id: 'm3', text: 'Route map sent me up a steep hill' },
  { id: 'x1', text: 'Loved the bell!' },
];

/** Hand-assigned themes for the notes above (assigned by hand for this test). */
const byHand = [
  { label: 'unlock', noteIds: ['u1', 'u2', 'u3'] },
  { label: 'helmet', noteIds: ['h1', 'h2', 'h3'] },
  { label: 'saddle', noteIds: ['s1', 's2', 's3'] },
  { label: 'dock', noteIds: ['d1', 'd2', 'd3'] },
  { label: 'map', noteIds: ['m1', 'm2', 'm3'] },
];

describe('suggestThemes', () => {
  it('finds the hand-labelled themes of the first-ride notes', () => {
    // Traps: "app" is in u1–u3 and m1, "dock" in h1, "took" in u2 and d1, "bike" in u1 and d3.
    expect(suggestThemes(firstRide)).toEqual(byHand);
  });

  it('is deterministic, and finds the same themes whatever order the notes come in', () => {
    const reversed = [...firstRide].reverse();
    const themes = suggestThemes(reversed);
    expect(suggestThemes(reversed)).toEqual(themes);
    // Themes of equal size follow their first note, so reversed notes give the reverse order.
    expect(themes.map((t) => t.label)).toEqual(byHand.map((t) => t.label).reverse());
    expect(themes.map((t) => [...t.noteIds].sort()).reverse()).toEqual(byHand.map((t) => t.noteIds));
  });

  it('does not let a word most notes use pull a note out of its theme', () => {
    // Four more notes that mention "bike" (invented, grouped by hand): d3 still belongs to the docks.
    const more = [
      ...firstRide,
      { id: 'b1', text: 'The bike felt heavy on the hill' },
      { id: 'b2', text: 'Bike brakes squeaked' },
      { id: 'b3', text: 'Nobody told me how to return the bike' },
      { id: 'b4', text: 'Great bike, smooth gears' },
    ];
    const themes = suggestThemes(more);
    expect(themes.find((t) => t.label === 'dock')?.noteIds).toEqual(['d1', 'd2', 'd3']);
    expect(themes.find((t) => t.label === 'unlock')?.noteIds).toEqual(['u1', 'u2', 'u3']);
  });

  it('leaves notes with no overlap ungrouped', () => {
    const apart = [
      { id: 'a', text: 'The bell is loud' },
      { id: 'b', text: 'Tyres felt soft' },
      { id: 'c', text: 'Staff were friendly' },
    ];
    expect(suggestThemes(apart)).toEqual([]);
    const grouped = suggestThemes(firstRide).flatMap((t) => t.noteIds);
    expect(grouped).not.toContain('x1');
  });

  it('groups only two or more notes, and copes with no notes, empty text and stop words alone', () => {
    expect(suggestThemes([])).toEqual([]);
    expect(suggestThemes([{ id: 'a', text: 'saddle' }])).toEqual([]);
    expect(
      suggestThemes([
        { id: 'a', text: '' },
        { id: 'b', text: 'and the of' },
        { id: 'c', text: '!!! 42' },
      ]),
    ).toEqual([]);
  });

  it('stems words, so different forms of a word meet', () => {
    const themes = suggestThemes([
      { id: 'a', text: 'Docking took a while' },
      { id: 'b', text: 'Docks were full' },
      { id: 'c', text: 'Where is the dock?' },
    ]);
    expect(themes).toEqual([{ label: 'dock', noteIds: ['a', 'b', 'c'] }]);
  });

  it('handles non-Latin text without crashing, and groups it by whole words', () => {
    const notes = [
      { id: 'ru1', text: 'Шлем слишком большой' },
      { id: 'ru2', text: 'Где оставить шлем?' },
      { id: 'ja', text: 'ヘルメットが大きすぎる' },
      { id: 'hi', text: 'हेलमेट बहुत बड़ा है' },
      { id: 'ar', text: 'الخوذة كبيرة جدا' },
      { id: 'el', text: 'Το κράνος ήταν μεγάλο' },
      { id: 'emoji', text: '🚲🚲 👍' },
    ];
    // The Japanese note shares "ヘルメット" with nothing else here; the Russian ones share "шлем".
    expect(suggestThemes(notes)).toEqual([{ label: 'шлем', noteIds: ['ru1', 'ru2'] }]);
    // Combining marks stay inside their word.
    expect(tokenize('हेलमेट बहुत बड़ा है')).toEqual(['हेलमेट', 'बहुत', 'बड़ा', 'है']);
  });

  // Notes written without spaces between words are grouped by the words Intl.Segmenter finds in them
  // (ICU's dictionaries), not by whole-phrase equality. Invented notes about the demo's helmets and docks;
  // the groups were assigned by hand for this test, the word splits are ICU's as Node 20 ships it.
  it('groups Japanese, Chinese and Thai notes by the words inside them', () => {
    const ja = [
      { id: 'j1', text: 'ヘルメットが大きすぎる' },
      { id: 'j2', text: 'ヘルメットをどこに置けばいいかわからない' },
      { id: 'j3', text: '駐輪場が満車だった' },
      { id: 'j4', text: '駐輪場が見つからない' },
    ];
    expect(suggestThemes(ja)).toEqual([
      { label: 'ヘルメット', noteIds: ['j1', 'j2'] },
      { label: '駐輪場', noteIds: ['j3', 'j4'] },
    ]);
    const zh = [
      { id: 'z1', text: '头盔太大了' },
      { id: 'z2', text: '没有头盔' },
      { id: 'z3', text: '停车桩满了' },
    ];
    expect(suggestThemes(zh)).toEqual([{ label: '头盔', noteIds: ['z1', 'z2'] }]);
    const th = [
      { id: 't1', text: 'หมวกกันน็อคใหญ่เกินไป' },
      { id: 't2', text: 'ไม่มีหมวกกันน็อคที่จุดจอด' },
      { id: 't3', text: 'เบรกดังมาก' },
    ];
    expect(suggestThemes(th).map((t) => t.noteIds)).toEqual([['t1', 't2']]);
    // Particles and function words alone do not make a theme.
    expect(suggestThemes([{ id: 'a', text: 'ベルが好き' }, { id: 'b', text: 'タイヤが柔らかい' }])).toEqual([]);
  });

  it('finds words inside spaceless runs, and keeps spaced scripts to runs of letters', () => {
    expect(tokenize('ヘルメットが大きすぎる')).toContain('ヘルメット');
    expect(tokenize('ヘルメットが大きすぎる')).not.toContain('が');
    expect(tokenize('没有头盔')).toContain('头盔');
    expect(tokenize('Helmet ヘルメット')).toEqual(['helmet', 'ヘルメット']);
  });

  it('joins the same groups as a plain average-link clustering of every pair (seeded random walls)', () => {
    // Reference: the textbook algorithm written out in full (every pair rescanned at every join), over
    // the same tokens and weights; checks that the faster bookkeeping changes nothing.
    const random = mulberry32(13_0004);
    const vocabulary = ['dock', 'helmet', 'saddle', 'map', 'unlock', 'brakes', 'bike', 'ride', 'lights', 'pump', 'gears', 'bell'];
    for (let wall = 0; wall < 15; wall++) {
      const notes = Array.from({ length: 5 + Math.floor(random() * 36) }, (_, i) => ({
        id: `n${i}`,
        text: Array.from({ length: 1 + Math.floor(random() * 4) }, () => vocabulary[Math.floor(random() * vocabulary.length)]).join(' '),
      }));
      const ours = suggestThemes(notes).map((t) => t.noteIds.join()).sort();
      expect(ours, `wall ${wall}`).toEqual(referenceGroups(notes).sort());
    }
  });

  it('asks for closer groups as minSimilarity rises, and refuses a threshold of 0', () => {
    expect(suggestThemes(firstRide, { minSimilarity: 0.9 })).toEqual([]);
    expect(() => suggestThemes(firstRide, { minSimilarity: 0 })).toThrow(RangeError);
  });
});

describe('tokenize', () => {
  it('lower-cases, keeps letters, drops apostrophes inside words and stop words', () => {
    expect(tokenize("I couldn't find the member's DOCK, 2 times!")).toEqual(['find', 'members', 'dock', 'times']);
    expect(tokenize('Café naïve')).toEqual(['café', 'naïve']);
  });
});

/** Average-link clustering by the book (weighted Jaccard, ln(1 + N ÷ n) weights, threshold 0.05), rescanning every pair. */
function referenceGroups(notes: ThemeNote[]): string[] {
  const stems = notes.map((n) => new Set(tokenize(n.text).map((w) => (/^[a-z]+$/.test(w) ? stemmer(w) : w))));
  const count = new Map<string, number>();
  for (const set of stems) for (const s of set) count.set(s, (count.get(s) ?? 0) + 1);
  const w = (s: string) => Math.log(1 + notes.length / count.get(s)!);
  const sim = (a: Set<string>, b: Set<string>) => {
    let shared = 0;
    let union = 0;
    for (const s of new Set([...a, ...b])) {
      union += w(s);
      if (a.has(s) && b.has(s)) shared += w(s);
    }
    return union === 0 ? 0 : shared / union;
  };
  let groups = notes.map((_, i) => [i]);
  for (;;) {
    let best = -1;
    let pair: [number, number] = [-1, -1];
    for (let i = 0; i < groups.length; i++) {
      for (let j = i + 1; j < groups.length; j++) {
        let sum = 0;
        for (const a of groups[i]) for (const b of groups[j]) sum += sim(stems[a], stems[b]);
        const average = sum / (groups[i].length * groups[j].length);
        if (average > best + 1e-12) [best, pair] = [average, [i, j]];
      }
    }
    if (best < 0.05) break;
    const [i, j] = pair;
    groups[i] = [...groups[i], ...groups[j]].sort((x, y) => x - y);
    groups = groups.filter((_, k) => k !== j);
  }
  return groups.filter((g) => g.length >= 2).map((g) => g.map((i) => notes[i].id).join());
}
