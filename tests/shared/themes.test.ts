import { describe, expect, it } from 'vitest';
import { suggestThemes, tokenize, type ThemeNote } from '../../shared/themes';

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
    expect(suggestThemes(notes)).toEqual([{ label: 'шлем', noteIds: ['ru1', 'ru2'] }]);
    // Combining marks stay inside their word.
    expect(tokenize('हेलमेट बहुत बड़ा है')).toEqual(['हेलमेट', 'बहुत', 'बड़ा', 'है']);
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
