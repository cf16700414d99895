import { describe, expect, it } from 'vitest';
import { newAgendaItem } from '../../shared/activities';
import { computeSchedule, shortestDayMin, toClock, toMinutes } from '../../shared/schedule';
import { ruleText, warningText } from './english';
import type { ActivityType, AgendaItem } from '../../shared/schemas/agenda-item';
import { RuleSettings, type DayWindow } from '../../shared/schemas/day-window';

const rules = RuleSettings.parse({});

// Common practice: block the venue 09:00–17:00, run the workshop 10:00–16:00.
const FULL_DAY: DayWindow = { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' };
// Common practice: a 4-hour workshop (a half day).
const HALF_DAY: DayWindow = { doorsOpen: '12:30', doorsClose: '17:30', start: '13:00', end: '17:00' };

let nextId = 0;
/** An item of a type with a given timebox, otherwise the library's defaults. */
function item(type: ActivityType, timeboxMin: number, extra: Partial<AgendaItem> = {}): AgendaItem {
  return { ...newAgendaItem(type, `i${++nextId}`), timeboxMin, ...extra };
}

function codes(items: AgendaItem[], window: DayWindow, r = rules) {
  return computeSchedule(items, window, r).warnings.map((w) => w.code);
}

describe('clock times', () => {
  it('converts HH:MM to minutes since midnight and back', () => {
    expect(toMinutes('00:00')).toBe(0);
    expect(toMinutes('09:30')).toBe(570);
    expect(toMinutes('16:00')).toBe(960);
    expect(toClock(570)).toBe('09:30');
    expect(toClock(0)).toBe('00:00');
    expect(toClock(23 * 60 + 59)).toBe('23:59');
  });

  it('rounds to the minute and wraps past midnight', () => {
    expect(toClock(600.4)).toBe('10:00');
    expect(toClock(600.6)).toBe('10:01');
    expect(toClock(24 * 60 + 15)).toBe('00:15');
  });

  it('rejects what is not a clock time', () => {
    expect(() => toMinutes('9.30')).toThrow(RangeError);
  });
});

describe('rule defaults', () => {
  it('match the trade rules of thumb', () => {
    // Published workshop-planning guides: never more than 60–90 min without a break.
    expect(rules.maxStretchMin).toBe(90);
    // Published workshop-planning guides: on a full day, lunch of at least 45 min.
    expect(rules.minLunchMin).toBe(45);
    // Common practice: leave slack, planned time at most 85 % of the window (agendas always overrun).
    expect(rules.loadCeilingPct).toBe(85);
    // Common practice: talk-only items of at most 20 min.
    expect(rules.maxTalkMin).toBe(20);
  });
});

describe('computeSchedule', () => {
  it('lays items back to back from the window start', () => {
    const items = [item('welcome', 10), item('icebreaker', 15), item('interview', 25)];
    const s = computeSchedule(items, FULL_DAY, rules);
    expect(s.items.map((i) => [i.start, i.end])).toEqual([
      ['10:00', '10:10'],
      ['10:10', '10:25'],
      ['10:25', '10:50'],
    ]);
    expect(s.items[2]).toMatchObject({ startMin: 625, endMin: 650 });
    expect(s.plannedMin).toBe(50);
    expect(s.windowMin).toBe(360);
    expect(s.endsAt).toBe('10:50');
  });

  it('counts load with breaks against the window from start to end', () => {
    // 300 of 360 min = 83.3 %: under the 85 % ceiling.
    const items = [item('interview', 80), item('break', 15), item('sketch', 80), item('lunch', 45), item('storyboard', 80)];
    const s = computeSchedule(items, FULL_DAY, rules);
    expect(s.plannedMin).toBe(300);
    expect(s.loadPct).toBeCloseTo((300 / 360) * 100, 10);
    expect(s.warnings.map((w) => w.code)).not.toContain('load_above_ceiling');
  });

  it('warns when the load passes the ceiling (common practice: 85 %, agendas overrun)', () => {
    // 310 / 360 = 86.1 %.
    const items = [item('interview', 85), item('break', 15), item('sketch', 85), item('lunch', 45), item('storyboard', 80)];
    const s = computeSchedule(items, FULL_DAY, rules);
    expect(s.loadPct).toBeCloseTo(86.11, 2);
    const w = s.warnings.find((x) => x.code === 'load_above_ceiling');
    expect(warningText(w!)).toMatch(/86\.1\u00a0%/);
    expect(ruleText(w!)).toMatch(/slack/);
    expect(ruleText(w!)).not.toMatch(/common practice|published|guide/);
    // Exactly at the ceiling is allowed: 306 / 360 = 85 %.
    const at = [item('interview', 81), item('break', 15), item('sketch', 85), item('lunch', 45), item('storyboard', 80)];
    expect(computeSchedule(at, FULL_DAY, rules).loadPct).toBe(85);
    expect(codes(at, FULL_DAY)).not.toContain('load_above_ceiling');
    // The ceiling is a setting.
    expect(codes(at, FULL_DAY, { ...rules, loadCeilingPct: 80 })).toContain('load_above_ceiling');
  });

  describe('breaks (published workshop-planning guides: never more than 60–90 min without a break)', () => {
    it('accepts a 90-minute stretch and warns at 95 minutes', () => {
      const ok = [item('interview', 45), item('empathy_map', 45), item('break', 15), item('insights', 30)];
      expect(codes(ok, HALF_DAY)).not.toContain('no_break_stretch');

      const a = item('interview', 50);
      const b = item('empathy_map', 45);
      const long = [a, b, item('break', 15), item('insights', 30)];
      const w = computeSchedule(long, HALF_DAY, rules).warnings.filter((x) => x.code === 'no_break_stretch');
      expect(w).toHaveLength(1);
      expect(w[0]!.itemIds).toEqual([a.id, b.id]);
      expect(warningText(w[0]!)).toMatch(/95 min without a break from 13:00/);
      // The screen gives Cairn's reason, not the guides' names.
      expect(ruleText(w[0]!)).toMatch(/an hour or so without a pause/);
    });

    it('checks the last stretch of the day as well, and lunch resets the stretch', () => {
      const tail = [item('insights', 30), item('lunch', 45), item('sketch', 50), item('storyboard', 50)];
      const w = computeSchedule(tail, HALF_DAY, rules).warnings.filter((x) => x.code === 'no_break_stretch');
      expect(w).toHaveLength(1);
      expect(w[0]!.itemIds).toEqual([tail[2]!.id, tail[3]!.id]);
    });

    it('follows the stretch setting (60 min, the stricter end of the guides)', () => {
      const items = [item('interview', 40), item('empathy_map', 30)];
      expect(codes(items, HALF_DAY)).not.toContain('no_break_stretch');
      expect(codes(items, HALF_DAY, { ...rules, maxStretchMin: 60 })).toContain('no_break_stretch');
    });
  });

  describe('lunch (published workshop-planning guides: full day, lunch ≥ 45 min)', () => {
    const morning = [item('interview', 60), item('break', 15), item('insights', 60)];
    const afternoon = [item('sketch', 60), item('break', 15), item('storyboard', 40)];

    it('accepts a 45-minute lunch on a full day', () => {
      expect(codes([...morning, item('lunch', 45), ...afternoon], FULL_DAY)).not.toContain('short_lunch');
    });

    it('warns about a 30-minute lunch, naming it', () => {
      const lunch = item('lunch', 30);
      const w = computeSchedule([...morning, lunch, ...afternoon], FULL_DAY, rules).warnings;
      expect(w.find((x) => x.code === 'short_lunch')?.itemIds).toEqual([lunch.id]);
    });

    it('warns when a full day has no lunch, but not on a half day', () => {
      expect(codes([...morning, ...afternoon], FULL_DAY)).toContain('short_lunch');
      const half = [item('interview', 60), item('break', 15), item('sketch', 60)];
      expect(computeSchedule(half, HALF_DAY, rules).fullDay).toBe(false);
      expect(codes(half, HALF_DAY)).not.toContain('short_lunch');
    });

    it('counts a window of exactly the full-day length as a full day', () => {
      const fiveHours: DayWindow = { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '15:00' };
      expect(computeSchedule([], fiveHours, rules).fullDay).toBe(true);
      const justUnder: DayWindow = { ...fiveHours, end: '14:59' };
      expect(computeSchedule([], justUnder, rules).fullDay).toBe(false);
    });
  });

  describe('talk (common practice: talk-only items at most 20 min)', () => {
    it('accepts 20 minutes of talk and warns at 25', () => {
      expect(codes([item('talk', 20)], HALF_DAY)).not.toContain('talk_too_long');
      const talk = item('welcome', 25);
      const w = computeSchedule([talk], HALF_DAY, rules).warnings.find((x) => x.code === 'talk_too_long');
      expect(w?.itemIds).toEqual([talk.id]);
    });

    it('does not count activities as talk, however long', () => {
      expect(codes([item('storyboard', 45)], HALF_DAY)).not.toContain('talk_too_long');
    });
  });

  describe('phases (the design-thinking process runs its phases in order)', () => {
    it('accepts phases in order, with breaks anywhere', () => {
      const items = [
        item('welcome', 10),
        item('interview', 25),
        item('break', 15),
        item('insights', 15),
        item('sketch', 20),
        item('storyboard', 30),
        item('test_rounds', 25),
        item('closing', 10),
      ];
      expect(codes(items, HALF_DAY)).not.toContain('phases_out_of_order');
    });

    it('flags an item whose phase comes before an earlier one, against the latest phase so far', () => {
      const sketch = item('sketch', 20);
      const interview = item('interview', 25);
      const insights = item('insights', 15);
      const items = [item('welcome', 10), sketch, item('break', 15), interview, insights, item('storyboard', 30)];
      const w = computeSchedule(items, HALF_DAY, rules).warnings.filter((x) => x.code === 'phases_out_of_order');
      expect(w.map((x) => x.itemIds)).toEqual([
        [interview.id, sketch.id],
        [insights.id, sketch.id],
      ]);
      expect(warningText(w[0]!)).toMatch(/Empathize.*Ideate/);
    });
  });

  it('warns when the plan runs past the window end, naming the items past it', () => {
    const a = item('interview', 150);
    const b = item('break', 15);
    const c = item('sketch', 60);
    const d = item('storyboard', 30);
    const s = computeSchedule([a, b, c, d], HALF_DAY, rules);
    expect(s.endsAt).toBe('17:15');
    const w = s.warnings.find((x) => x.code === 'overruns_window');
    expect(w?.itemIds).toEqual([d.id]);
    expect(warningText(w!)).toMatch(/15 min after/);
  });

  describe('day too short', () => {
    it('sums the shortest item of each phase the agenda uses', () => {
      const items = [
        item('interview', 25, { minTimeboxMin: 17 }),
        item('empathy_map', 20, { minTimeboxMin: 13 }),
        item('break', 15),
        item('sketch', 20, { minTimeboxMin: 13 }),
      ];
      // empathize: min(17, 13) = 13; ideate: 13; breaks do not count.
      expect(shortestDayMin(items)).toBe(26);
      const short: DayWindow = { doorsOpen: '13:00', doorsClose: '14:00', start: '13:00', end: '13:25' };
      expect(codes(items, short)).toContain('day_too_short');
      const enough: DayWindow = { ...short, end: '13:26' };
      expect(codes(items, enough)).not.toContain('day_too_short');
    });

    it('uses the five core phases when the agenda has no activities yet', () => {
      // Library minimums: empathize 17 (interview 25 → 17, empathy map 25 → 17), define 7,
      // ideate 7, prototype 20, test 20 = 71 min.
      expect(shortestDayMin([])).toBe(71);
      expect(shortestDayMin([item('break', 15)])).toBe(71);
    });
  });

  it('gives a calm plan no warnings at all', () => {
    const items = [
      item('welcome', 10),
      item('interview', 25),
      item('break', 15),
      item('insights', 15),
      item('sketch', 20),
      item('break', 15),
      item('storyboard', 30),
      item('test_rounds', 25),
      item('closing', 10),
    ];
    const s = computeSchedule(items, HALF_DAY, rules);
    expect(s.warnings).toEqual([]);
    expect(s.endsAt).toBe('15:45');
  });

  it('gives every warning a message and an origin', () => {
    const items = [item('sketch', 320), item('welcome', 40), item('lunch', 20)];
    const s = computeSchedule(items, FULL_DAY, rules);
    expect(new Set(s.warnings.map((w) => w.code))).toEqual(
      new Set(['load_above_ceiling', 'phases_out_of_order', 'no_break_stretch', 'short_lunch', 'talk_too_long', 'overruns_window', 'lunch_off_midday']),
    );
    for (const w of s.warnings) {
      expect(warningText(w).length).toBeGreaterThan(10);
      expect(ruleText(w).length).toBeGreaterThan(10);
    }
  });
});

describe('pinned items (times counted by hand)', () => {
  it('flows around a pinned lunch: a gap before it is a buffer, later items follow it', () => {
    // 09:00–16:00; 3 × 60 min from 09:00 end at 12:00; lunch pinned at 12:30 → 30 min buffer,
    // lunch 12:30–13:15, then 60 min 13:15–14:15.
    const w: DayWindow = { doorsOpen: '08:30', doorsClose: '17:00', start: '09:00', end: '16:00' };
    const items = [item('sketch', 60), item('break', 15), item('sketch', 45), item('lunch', 45, { pinnedAt: '12:30' }), item('storyboard', 60)];
    const s = computeSchedule(items, w, { ...rules, maxStretchMin: 90 });
    expect(s.items.map((x) => `${x.start}-${x.end}`)).toEqual(['09:00-10:00', '10:00-10:15', '10:15-11:00', '12:30-13:15', '13:15-14:15']);
    expect(s.items.map((x) => x.bufferBeforeMin)).toEqual([0, 0, 0, 90, 0]);
    expect(s.items[3]!.pinned).toBe(true);
    // Planned time counts timeboxes only: 60 + 15 + 45 + 45 + 60 = 225 of 420 min.
    expect(s.plannedMin).toBe(225);
    expect(s.endsAt).toBe('14:15');
    // 16:00 − 14:15 = 105 min idle at the end, above the 90 min of the idle-end rule (common practice).
    expect(s.warnings.map((x) => x.code)).toContain('idle_end');
    expect(s.warnings.map((x) => x.code)).not.toContain('pinned_overlap');
  });

  it('warns when the items before a pinned item run into it', () => {
    // 10:00 + 150 min = 12:30, lunch pinned at 12:00 → 30 min overlap; lunch 12:00–12:45; next from 12:45.
    const items = [item('sketch', 80), item('break', 15), item('sketch', 55), item('lunch', 45, { pinnedAt: '12:00' }), item('closing', 10)];
    const s = computeSchedule(items, FULL_DAY, rules);
    expect(s.items[3]).toMatchObject({ start: '12:00', end: '12:45', bufferBeforeMin: 0 });
    expect(s.items[4]).toMatchObject({ start: '12:45', end: '12:55' });
    const overlap = s.warnings.find((x) => x.code === 'pinned_overlap')!;
    expect(overlap.itemIds).toEqual([items[3]!.id]);
    expect(warningText(overlap)).toMatch(/run until 12:30: 30 min overlap/);
  });

  it('moving the day keeps a pinned lunch at its time (the day 09:00–16:00)', () => {
    const w: DayWindow = { doorsOpen: '08:30', doorsClose: '17:00', start: '09:00', end: '16:00' };
    const unpinned = [item('sketch', 60), item('break', 15), item('sketch', 45), item('lunch', 45), item('storyboard', 60)];
    // Unpinned, lunch runs on from the morning: 09:00 + 120 = 11:00, before 11:30 (common practice: lunch 11:30–14:00).
    const off = computeSchedule(unpinned, w, rules);
    expect(off.items[3]!.start).toBe('11:00');
    const lunchWarning = off.warnings.find((x) => x.code === 'lunch_off_midday')!;
    expect(warningText(lunchWarning)).toMatch(/starts at 11:00, outside 11:30–14:00/);
    const pinned = unpinned.map((x) => (x.type === 'lunch' ? { ...x, pinnedAt: '12:00' } : x));
    const on = computeSchedule(pinned, w, rules);
    expect(on.items[3]!.start).toBe('12:00');
    expect(on.warnings.map((x) => x.code)).not.toContain('lunch_off_midday');
  });

  it('says a stretch without a break once, with where a break would fit', () => {
    // 40 + 30 + 30 + 20 = 120 min from 10:00, over 90; 40 + 30 = 70 fits, 40 + 30 + 30 = 100 does not:
    // a break fits after the second item, which ends at 11:10.
    const items = [item('interview', 40), item('empathy_map', 30), item('insights', 30), item('how_might_we', 20)];
    const w = computeSchedule(items, FULL_DAY, rules).warnings.filter((x) => x.code === 'no_break_stretch');
    expect(w).toHaveLength(1);
    expect(w[0]!.atItemId).toBe(items[1]!.id);
    expect(warningText(w[0]!)).toMatch(/A break would fit after “.+” \(ends 11:10\)/);
  });
});

