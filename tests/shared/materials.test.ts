import { describe, expect, it } from 'vitest';
import { ACTIVITY_LIBRARY, IMPACT_EFFORT_CRITERIA, newAgendaItem } from '../../shared/activities';
import { cautionsFor } from '../../shared/cautions';
import { packingList } from '../../shared/materials';
import { instantiateTemplate } from '../../shared/templates';
import { amountText, cautionText, cautionTitle, howText, materialName, whyText } from './english';
import type { ActivitySettings, ActivityType, AgendaItem } from '../../shared/schemas/agenda-item';

// The demo scenario: 18 participants in 3 teams. Every expected sum is worked out by hand beside it.
const HEADCOUNT = 18;
const TEAMS = 3;

let nextId = 0;
function item(type: ActivityType, settings?: ActivitySettings): AgendaItem {
  const base = newAgendaItem(type, `${type}-${++nextId}`);
  return settings ? { ...base, settings: { ...base.settings, ...settings } } : base;
}

const line = (list: ReturnType<typeof packingList>, key: string) => list.find((l) => l.key === key);

describe('packingList', () => {
  describe('dot stickers (a published facilitation guide; common practice: dots × voters + 50 % spare)', () => {
    it('3 dots, 2 criteria, 18 voters: 3 × 2 × 18 × 1.5 = 162', () => {
      const vote = item('dot_vote', { dotsPerVoter: 3, criteria: [...IMPACT_EFFORT_CRITERIA] });
      const dots = line(packingList([vote], HEADCOUNT, TEAMS), 'dot_stickers');
      expect(dots).toMatchObject({ quantity: 162, usedBy: [vote.id] });
      expect(amountText(dots!)).toBe('162 dots');
      // The origin stays in the rule (for this test); the screen says Cairn's own reason.
      expect(ACTIVITY_LIBRARY.dot_vote.materials.find((r) => r.item === 'dot_stickers')!.source).toMatch(/50 % spare/);
      expect(whyText(dots!.shares[0]!)).toBe('every voter’s dots and half again spare');
    });

    it('no criteria counts as one: 3 × 1 × 18 × 1.5 = 81', () => {
      expect(line(packingList([item('dot_vote')], HEADCOUNT, TEAMS), 'dot_stickers')?.quantity).toBe(81);
    });

    it('rounds up: 5 × 1 × 7 × 1.5 = 52.5 → 53', () => {
      expect(line(packingList([item('dot_vote', { dotsPerVoter: 5 })], 7, 2), 'dot_stickers')?.quantity).toBe(53);
    });

    it('adds two votes: 162 + 81 = 243', () => {
      const list = packingList(
        [item('dot_vote', { criteria: [...IMPACT_EFFORT_CRITERIA] }), item('dot_vote')],
        HEADCOUNT,
        TEAMS,
      );
      expect(line(list, 'dot_stickers')?.quantity).toBe(243);
    });
  });

  it('adds up sticky notes per person and per team (common practice quantities)', () => {
    // Insights 10 each + empathy map 15 each + storyboard 20 per team: 180 + 270 + 60 = 510.
    const items = [item('empathy_map'), item('insights'), item('storyboard')];
    const notes = line(packingList(items, HEADCOUNT, TEAMS), 'sticky_notes');
    expect(notes?.quantity).toBe(510);
    expect(notes?.usedBy).toEqual(items.map((i) => i.id));
  });

  it('takes the largest need of things used again: markers, tape, equipment', () => {
    // One marker each serves interview, empathy map, insights and sketch: 18, not 72.
    // Tape: one roll a team for the map and again for the storyboard: 3, not 6.
    const items = [
      item('welcome'),
      item('interview'),
      item('empathy_map'),
      item('insights'),
      item('dot_vote'),
      item('sketch'),
      item('storyboard'),
      item('closing'),
    ];
    const list = packingList(items, HEADCOUNT, TEAMS);
    expect(line(list, 'markers')?.quantity).toBe(18);
    expect(line(list, 'tape')?.quantity).toBe(3);
    // Fixed once per workshop, however many items use it.
    expect(line(list, 'projector')?.quantity).toBe(1);
    expect(line(list, 'projector')?.usedBy).toHaveLength(3);
    expect(line(list, 'tablet')?.quantity).toBe(1);
    expect(line(list, 'whiteboard')?.quantity).toBe(1);
  });

  it('adds snacks and water for every break and lunch that serves them', () => {
    // Two breaks and lunch with snacks: 3 × 18 = 54 of each; a break without snacks adds nothing.
    const items = [item('break'), item('lunch'), item('break'), item('break', { snacks: false })];
    const list = packingList(items, HEADCOUNT, TEAMS);
    expect(line(list, 'snacks')).toMatchObject({ quantity: 54 });
    expect(amountText(line(list, 'snacks')!)).toBe('54 servings');
    expect(line(list, 'water')?.quantity).toBe(54);
    expect(line(list, 'snacks')?.usedBy).toEqual(items.slice(0, 3).map((i) => i.id));
  });

  it('sums the whole full-day template for the demo scenario', () => {
    let n = 0;
    const { items } = instantiateTemplate('full-day', () => `t${++n}`);
    const list = packingList(items, HEADCOUNT, TEAMS);
    const q = Object.fromEntries(list.map((l) => [l.key, l.quantity]));
    expect(q).toEqual({
      // empathy map 15 + insights 10 + point of view 3 + how might we 5 + test rounds 8 + closing 3
      // = 44 each → 792; storyboard 20 a team → 60; total 852.
      sticky_notes: 852,
      markers: 18,
      // interview 1 each + sketch 2 each = 54.
      paper_a4: 54,
      // empathy map 1 a team + storyboard 2 a team + feedback grid 1 a team = 12.
      paper_a3: 12,
      // 3 dots, one criterion, 18 voters, +50 %: 81.
      dot_stickers: 81,
      tape: 3,
      whiteboard: 1,
      projector: 1,
      tablet: 1,
      timer: 1,
      // three breaks and lunch: 4 × 18 = 72.
      snacks: 72,
      water: 72,
    });
    for (const l of list) {
      expect(l.shares.every((s) => whyText(s).length > 0)).toBe(true);
      expect(materialName(l).length).toBeGreaterThan(0);
    }
  });

  it('leaves out what comes to nothing, and lists nothing for an empty agenda', () => {
    expect(packingList([], HEADCOUNT, TEAMS)).toEqual([]);
    expect(packingList([item('insights')], 0, TEAMS).map((l) => l.key)).toEqual(['whiteboard']);
  });
});

describe('cautionsFor', () => {
  it('always raises room capacity and fire exits, deferring to the venue', () => {
    const c = cautionsFor([], { headcount: HEADCOUNT, hasPhotos: false });
    expect(c.map((x) => x.code)).toEqual(['room_capacity']);
    expect(cautionText(c[0]!)).toMatch(/18 people/);
    expect(cautionText(c[0]!)).toMatch(/venue's rules and local codes/);
  });

  it('says so when the headcount passes a known room capacity', () => {
    const c = cautionsFor([], { headcount: 30, hasPhotos: false, roomCapacity: 24 });
    expect(cautionText(c[0]!)).toMatch(/30 people, more than the 24/);
  });

  it('raises food allergies for snacks at breaks and lunch', () => {
    const brk = item('break');
    const lunch = item('lunch');
    const c = cautionsFor([brk, lunch, item('break', { snacks: false })], { headcount: HEADCOUNT, hasPhotos: false });
    const food = c.find((x) => x.code === 'food_allergies');
    expect(food?.itemIds).toEqual([brk.id, lunch.id]);
    expect(cautionText(food!)).toMatch(/allergies/);
    expect(cautionText(food!)).toMatch(/label/);
    expect(cautionsFor([item('break', { snacks: false })], { headcount: 5, hasPhotos: false }).map((x) => x.code)).not.toContain(
      'food_allergies',
    );
  });

  it('raises access for movement icebreakers, with a seated way to take part', () => {
    const ice = item('icebreaker');
    const seated = item('icebreaker', { movement: false });
    const c = cautionsFor([ice, seated], { headcount: HEADCOUNT, hasPhotos: false });
    const access = c.find((x) => x.code === 'movement_access');
    expect(access?.itemIds).toEqual([ice.id]);
    expect(cautionText(access!)).toMatch(/seated/);
    // Without a setting, the type's default counts: icebreakers move.
    const bare = { ...item('icebreaker'), settings: {} };
    expect(cautionsFor([bare], { headcount: 5, hasPhotos: false }).map((x) => x.code)).toContain('movement_access');
  });

  it('raises personal data for photo uploads or when photos are taken, deferring to the policy', () => {
    const sketch = item('sketch');
    const board = item('storyboard');
    const c = cautionsFor([item('interview'), sketch, board], { headcount: HEADCOUNT, hasPhotos: false });
    const photos = c.find((x) => x.code === 'photos_personal_data');
    expect(photos?.itemIds).toEqual([sketch.id, board.id]);
    expect(cautionText(photos!)).toMatch(/organisation's data policy/);
    const byFlag = cautionsFor([item('interview')], { headcount: HEADCOUNT, hasPhotos: true });
    expect(byFlag.find((x) => x.code === 'photos_personal_data')?.itemIds).toEqual([]);
  });

  it('gives the full-day template all four cautions, in a fixed order', () => {
    let n = 0;
    const { items } = instantiateTemplate('full-day', () => `t${++n}`);
    const c = cautionsFor(items, { headcount: HEADCOUNT, hasPhotos: false });
    expect(c.map((x) => x.code)).toEqual(['food_allergies', 'movement_access', 'room_capacity', 'photos_personal_data']);
    for (const x of c) expect(cautionTitle(x).length).toBeGreaterThan(0);
  });
});

describe('why this many', () => {
  it('says how the dot stickers are made, the criteria factor included (counted by hand)', () => {
    // Common practice (a published facilitation guide): dots per voter × voters, plus 50 % spare;
    // two criteria double the dots: 5 × 2 × 24 × 1.5 = 360.
    const vote = { ...newAgendaItem('dot_vote', 'v1'), title: 'Pick the challenges', settings: { dotsPerVoter: 5, criteria: [{ id: 'impact', label: 'Impact' }, { id: 'effort', label: 'Effort' }] } };
    const line = packingList([vote], 24, 3).find((l) => l.key === 'dot_stickers')!;
    expect(line.quantity).toBe(360);
    expect(line.shares.map((s) => ({ itemId: s.itemId, title: s.title, quantity: s.quantity, how: howText(s), why: whyText(s) }))).toEqual([
      { itemId: 'v1', title: 'Pick the challenges', quantity: 360, how: '5 dots × 2 criteria × 24 people × 1.5 (with spares) = 360', why: 'every voter’s dots and half again spare' },
    ]);
    expect(line.adds).toBe('sum');
    // Votes run on the phones: paper dots are the fallback.
    expect(line.fallback).toBe(true);
    // The words on screen name no source.
    for (const l of packingList([vote], 24, 3)) for (const s of l.shares) expect(`${howText(s)} ${whyText(s)}`).not.toMatch(/guide|handbook|practice|d\.school|method card|published/i);
    // Every reason in the library, too: whatever agenda is packed, the screen names no source.
    for (const def of Object.values(ACTIVITY_LIBRARY)) for (const r of def.materials) expect(whyText({ why: { message: r.why, params: { n: r.quantity } } } as never)).not.toMatch(/guide|handbook|practice|d\.school|method card|published|dotmocracy|global learning/i);
  });

  it('says each amount in the right number: "1 board", "1 set", "2 boards"', () => {
    // English grammar (CLDR plural rule "one" for exactly 1).
    const list = packingList([item('insights'), item('welcome')], 1, 1);
    expect(amountText(line(list, 'whiteboard')!)).toBe('1 board');
    expect(amountText(line(list, 'projector')!)).toBe('1 set');
    expect(amountText(line(list, 'markers')!)).toBe('1 marker');
    expect(howText(line(list, 'sticky_notes')!.shares[0]!)).toBe('10 × 1 person = 10');
  });

  it('adds the shares of used-up things and takes the largest of things used again', () => {
    const a = { ...newAgendaItem('insights', 'a'), title: 'A' };
    const b = { ...newAgendaItem('insights', 'b'), title: 'B' };
    const lines = packingList([a, b], 10, 2);
    for (const l of lines) {
      const total = l.shares.reduce((sum, s) => sum + s.quantity, 0);
      const most = Math.max(...l.shares.map((s) => s.quantity));
      expect(l.quantity).toBe(Math.ceil(l.adds === 'sum' ? total : most));
    }
  });
});

