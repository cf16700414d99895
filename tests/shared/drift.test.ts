import { describe, expect, it } from 'vitest';
import { newAgendaItem } from '../../shared/activities';
import { computeDrift, cutRunTimeboxes, driftAnchor, suggestShortening, undoRunCut, withRunTimeboxes } from '../../shared/drift';
import { computeSchedule, flowTimes, toMinutes } from '../../shared/schedule';
import { instantiateTemplate } from '../../shared/templates';
import type { ActivityType, AgendaItem } from '../../shared/schemas/agenda-item';
import { RuleSettings, type DayWindow } from '../../shared/schemas/day-window';

// The worked numbers below are checked by hand; the expected values are written out, not computed.

const WINDOW: DayWindow = { doorsOpen: '09:30', doorsClose: '12:00', start: '10:00', end: '11:30' };

function item(id: string, type: ActivityType, timeboxMin: number, minTimeboxMin: number): AgendaItem {
  return { ...newAgendaItem(type, id), timeboxMin, minTimeboxMin };
}

// 10:00 A (30) → 10:30 B (20) → 10:50 C (40) → 11:30; exactly the window.
const SIMPLE = [item('A', 'interview', 30, 20), item('B', 'insights', 20, 13), item('C', 'sketch', 40, 27)];

describe('computeDrift', () => {
  it('is zero when the day runs to plan', () => {
    // B started on time at 10:30; at 10:35 it has 15 min left.
    const d = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 1,
      currentStartedAtMin: toMinutes('10:30'),
      currentRemainingMin: 15,
      nowMin: toMinutes('10:35'),
    });
    expect(d).toMatchObject({
      plannedStartMin: 630,
      startedLateMin: 0,
      driftMin: 0,
      plannedEndMin: 690,
      projectedEndMin: 690,
      projectedEnd: '11:30',
      overrunMin: 0,
      completedOverMin: 0,
    });
  });

  it('projects the end from now, what is left and the later timeboxes', () => {
    // A ran 5 min over; B started 10:35, now 10:45 with 10 min left: 10:45 + 10 + 40 = 11:35.
    const d = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 1,
      currentStartedAtMin: toMinutes('10:35'),
      currentRemainingMin: 10,
      nowMin: toMinutes('10:45'),
      completed: [{ id: 'A', actualMin: 35 }],
    });
    expect(d.plannedStartMin).toBe(630);
    expect(d.startedLateMin).toBe(5);
    expect(d.projectedEndMin).toBe(695);
    expect(d.projectedEnd).toBe('11:35');
    expect(d.driftMin).toBe(5);
    expect(d.overrunMin).toBe(5);
    expect(d.completedOverMin).toBe(5);
  });

  it('counts a paused or extended countdown, and an early day as negative overrun', () => {
    // B started on time but was paused: at 10:45 it still has 18 min left → 10:45 + 18 + 40 = 11:43.
    const paused = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 1,
      currentStartedAtMin: 630,
      currentRemainingMin: 18,
      nowMin: 645,
    });
    expect(paused.projectedEnd).toBe('11:43');
    expect(paused.driftMin).toBe(13);
    // C started at 10:45, 5 min early, and runs to plan: it ends at 11:25.
    const early = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 2,
      currentStartedAtMin: 645,
      currentRemainingMin: 30,
      nowMin: 655,
    });
    expect(early.startedLateMin).toBe(-5);
    expect(early.projectedEndMin).toBe(685);
    expect(early.driftMin).toBe(-5);
    expect(early.overrunMin).toBe(-5);
  });

  it('accepts seconds as fractions of a minute', () => {
    const d = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 0,
      currentStartedAtMin: 600,
      currentRemainingMin: 29.5,
      nowMin: 601,
    });
    expect(d.driftMin).toBeCloseTo(0.5, 10);
    expect(d.projectedEnd).toBe('11:31');
  });

  it('refuses an index outside the agenda', () => {
    const base = { items: SIMPLE, window: WINDOW, currentStartedAtMin: 600, currentRemainingMin: 1, nowMin: 600 };
    expect(() => computeDrift({ ...base, currentIndex: 3 })).toThrow(RangeError);
    expect(() => computeDrift({ ...base, currentIndex: -1 })).toThrow(RangeError);
  });
});

describe('suggestShortening', () => {
  // Current item 0; after it: X slack 10, a break, Y slack 30, a lunch, Z no slack.
  const AGENDA = [
    item('now', 'interview', 25, 17),
    item('X', 'empathy_map', 30, 20),
    { ...item('brk', 'break', 15, 15), minTimeboxMin: 5 },
    item('Y', 'sketch', 50, 20),
    item('lunch', 'lunch', 45, 45),
    item('Z', 'storyboard', 30, 30),
  ];

  it('recovers exactly, in proportion to slack (largest remainder, ties to the larger slack)', () => {
    // 10 min over slack 10 and 30: shares 2.5 and 7.5 → 2 and 7, the spare minute to Y (larger slack).
    const s = suggestShortening(AGENDA, 0, 10);
    expect(s).toEqual({
      cuts: [
        { itemId: 'X', fromMin: 30, toMin: 28 },
        { itemId: 'Y', fromMin: 50, toMin: 42 },
      ],
      recoveredMin: 10,
      shortfallMin: 0,
    });
  });

  it('splits evenly divisible amounts exactly', () => {
    // 20 min over slack 10 and 30: 5 and 15.
    const s = suggestShortening(AGENDA, 0, 20);
    expect(s.cuts.map((c) => c.fromMin - c.toMin)).toEqual([5, 15]);
    expect(s.recoveredMin).toBe(20);
  });

  it('reports a shortfall when the slack is not enough, cutting everything to its minimum', () => {
    const s = suggestShortening(AGENDA, 0, 55);
    expect(s.cuts).toEqual([
      { itemId: 'X', fromMin: 30, toMin: 20 },
      { itemId: 'Y', fromMin: 50, toMin: 20 },
    ]);
    expect(s.recoveredMin).toBe(40);
    expect(s.shortfallMin).toBe(15);
  });

  it('never touches breaks, lunch, the current item or earlier ones', () => {
    const s = suggestShortening(AGENDA, 0, 200);
    const cut = s.cuts.map((c) => c.itemId);
    expect(cut).not.toContain('brk');
    expect(cut).not.toContain('lunch');
    expect(cut).not.toContain('now');
    // From Y on, only Y can give.
    expect(suggestShortening(AGENDA, 2, 12).cuts).toEqual([{ itemId: 'Y', fromMin: 50, toMin: 38 }]);
    // Nothing after the last item.
    expect(suggestShortening(AGENDA, 5, 12)).toEqual({ cuts: [], recoveredMin: 0, shortfallMin: 12 });
  });

  it('never cuts below the minimum and always recovers min(wanted, slack)', () => {
    const agenda = [
      item('c', 'welcome', 10, 7),
      item('a', 'insights', 17, 11),
      item('b', 'point_of_view', 13, 9),
      item('brk', 'break', 15, 15),
      item('d', 'how_might_we', 23, 16),
      item('e', 'dot_vote', 11, 11),
      item('f', 'storyboard', 41, 20),
    ];
    const slack = 6 + 4 + 7 + 21;
    for (let wanted = 0; wanted <= 45; wanted++) {
      const s = suggestShortening(agenda, 0, wanted);
      for (const c of s.cuts) {
        const original = agenda.find((i) => i.id === c.itemId)!;
        expect(c.toMin).toBeGreaterThanOrEqual(original.minTimeboxMin);
        expect(c.toMin).toBeLessThan(c.fromMin);
        expect(Number.isInteger(c.toMin)).toBe(true);
      }
      const recovered = s.cuts.reduce((sum, c) => sum + c.fromMin - c.toMin, 0);
      expect(recovered).toBe(Math.min(wanted, slack));
      expect(s.recoveredMin).toBe(recovered);
      expect(s.shortfallMin).toBe(wanted - recovered);
      // Deterministic: the same question gets the same answer.
      expect(suggestShortening(agenda, 0, wanted)).toEqual(s);
    }
  });

  it('rounds part minutes up and ignores nothing to recover', () => {
    expect(suggestShortening(AGENDA, 0, 3.2).recoveredMin).toBe(4);
    expect(suggestShortening(AGENDA, 0, 0)).toEqual({ cuts: [], recoveredMin: 0, shortfallMin: 0 });
    expect(suggestShortening(AGENDA, 0, -5)).toEqual({ cuts: [], recoveredMin: 0, shortfallMin: 0 });
  });

  it('brings a late full day back to plan', () => {
    // The full-day template, 12 min behind during the interview.
    const { items, window } = instantiateTemplate('full-day', (() => { let n = 0; return () => `t${++n}`; })());
    const rules = RuleSettings.parse({});
    const plannedEnd = computeSchedule(items, window, rules).items.at(-1)!.endMin;
    const interview = items.findIndex((i) => i.type === 'interview');
    const start = computeSchedule(items, window, rules).items[interview]!.startMin;
    const drift = computeDrift({
      items,
      window,
      currentIndex: interview,
      currentStartedAtMin: start + 12,
      currentRemainingMin: items[interview]!.timeboxMin,
      nowMin: start + 12,
    });
    expect(drift.driftMin).toBe(12);
    const s = suggestShortening(items, interview, drift.driftMin);
    expect(s.shortfallMin).toBe(0);
    const shortened = items.map((i) => {
      const cut = s.cuts.find((c) => c.itemId === i.id);
      return cut ? { ...i, timeboxMin: cut.toMin } : i;
    });
    const after = computeDrift({
      items: shortened,
      window,
      currentIndex: interview,
      currentStartedAtMin: start + 12,
      currentRemainingMin: items[interview]!.timeboxMin,
      nowMin: start + 12,
    });
    expect(after.projectedEndMin).toBe(plannedEnd);
  });
});

describe('drift around an item pinned to a clock time', () => {
  // Worked by hand (Cairn's own rule, issue "items at a fixed time": catering arrives at 12:30).
  // Plan 10:00–14:00: A 10:00–11:00, B 11:00–12:00, 30 min buffer, lunch pinned 12:30–13:15, C 13:15–14:00.
  const DAY: DayWindow = { doorsOpen: '09:30', doorsClose: '14:30', start: '10:00', end: '14:00' };
  const PINNED = [
    item('A', 'interview', 60, 40),
    item('B', 'insights', 60, 40),
    { ...item('L', 'lunch', 45, 45), pinnedAt: '12:30' },
    item('C', 'sketch', 45, 30),
  ];
  const at = (d: ReturnType<typeof computeDrift>, id: string) => d.projected.find((p) => p.id === id)!;

  it('plans the lunch at its clock time, with the gap before it as buffer, the same as the plan page', () => {
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 1, currentStartedAtMin: 660, currentRemainingMin: 50, nowMin: 670 });
    expect(d).toMatchObject({ plannedStartMin: 660, startedLateMin: 0, driftMin: 0, plannedEndMin: 840, projectedEnd: '14:00', overrunMin: 0 });
    expect(at(d, 'L')).toEqual({ id: 'L', startMin: 750, endMin: 795, bufferBeforeMin: 30, pinned: true, lateMin: 0 });
    // The plan page's schedule lays the day out by the same flow.
    const plan = computeSchedule(PINNED, DAY, RuleSettings.parse({}));
    expect(plan.items.find((i) => i.id === 'L')).toMatchObject({ start: '12:30', bufferBeforeMin: 30 });
    expect(plan.endsAt).toBe('14:00');
  });

  it('lets the buffer absorb drift: 20 min late, lunch still starts at 12:30 and the day ends on plan', () => {
    // A ran 20 min over; B started 11:20 and ends 12:20; 10 min of buffer are left before lunch.
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 1, currentStartedAtMin: 680, currentRemainingMin: 50, nowMin: 690 });
    expect(d).toMatchObject({ startedLateMin: 20, driftMin: 0, projectedEnd: '14:00', overrunMin: 0 });
    expect(at(d, 'L')).toMatchObject({ startMin: 750, bufferBeforeMin: 10 });
    // Without the pin the same run ends 20 min late: 12:20 + 45 + 45 = 13:50 against a 13:30 plan.
    const unpinned = PINNED.map((i) => ({ ...i, pinnedAt: null }));
    expect(computeDrift({ items: unpinned, window: DAY, currentIndex: 1, currentStartedAtMin: 680, currentRemainingMin: 50, nowMin: 690 }).driftMin).toBe(20);
  });

  it('moves the pinned item only by the drift beyond its buffer: 40 min late, lunch at 12:40 and the day 10 min over', () => {
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 1, currentStartedAtMin: 700, currentRemainingMin: 50, nowMin: 710 });
    expect(at(d, 'L')).toMatchObject({ startMin: 760, endMin: 805, bufferBeforeMin: 0, lateMin: 10 });
    expect(d).toMatchObject({ driftMin: 10, projectedEnd: '14:10', overrunMin: 10 });
  });

  it('suggests cuts that win time back at the end, not cuts that only widen the buffer before the pin', () => {
    // Worked by hand. A ran 40 min over; B (slack 20) runs to 12:40, lunch starts 12:40 (10 min late),
    // C (slack 15) ends 14:10: 10 min over. Cutting B alone would end B at 12:30 and win all 10 min; but
    // with 70 min over, lunch waits for B only 10 min past 12:30, so B can give at most 10 and C the rest.
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 0, currentStartedAtMin: 600, currentRemainingMin: 40, nowMin: 660 });
    expect(at(d, 'L')).toMatchObject({ startMin: 760, lateMin: 10 });
    const late = Object.fromEntries(d.projected.map((p) => [p.id, p.lateMin]));
    // 10 min over: taken after the pin first (C), where every minute counts.
    expect(suggestShortening(PINNED, 0, d.overrunMin, late)).toEqual({ cuts: [{ itemId: 'C', fromMin: 45, toMin: 35 }], recoveredMin: 10, shortfallMin: 0 });
    // 22 min over: C gives its 15, B at most the 10 lunch waits for it; 7 come from B.
    expect(suggestShortening(PINNED, 0, 22, late)).toEqual({
      cuts: [{ itemId: 'B', fromMin: 60, toMin: 53 }, { itemId: 'C', fromMin: 45, toMin: 30 }],
      recoveredMin: 22,
      shortfallMin: 0,
    });
    // 40 min over: C 15 + B 10 (the lunch's lateness); the rest cannot be won back before the pin.
    expect(suggestShortening(PINNED, 0, 40, late)).toEqual({
      cuts: [{ itemId: 'B', fromMin: 60, toMin: 50 }, { itemId: 'C', fromMin: 45, toMin: 30 }],
      recoveredMin: 25,
      shortfallMin: 15,
    });
  });

  it('never cuts before a pinned item that still has buffer: that would only widen the buffer', () => {
    // A on time: lunch holds 12:30 with 30 min of buffer. Asked for 25 min (as if the day were over), only C can give.
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 0, currentStartedAtMin: 600, currentRemainingMin: 40, nowMin: 620 });
    expect(at(d, 'L')).toMatchObject({ lateMin: 0, bufferBeforeMin: 30 });
    const late = Object.fromEntries(d.projected.map((p) => [p.id, p.lateMin]));
    expect(suggestShortening(PINNED, 0, 25, late)).toEqual({ cuts: [{ itemId: 'C', fromMin: 45, toMin: 30 }], recoveredMin: 15, shortfallMin: 10 });
    // Without the lateness given, a pinned item counts as on time.
    expect(suggestShortening(PINNED, 0, 25)).toEqual(suggestShortening(PINNED, 0, 25, late));
    // The 15 min cut to C moves the projected end by exactly 15.
    const cut = PINNED.map((i) => (i.id === 'C' ? { ...i, timeboxMin: 30 } : i));
    const after = computeDrift({ items: cut, window: DAY, currentIndex: 0, currentStartedAtMin: 600, currentRemainingMin: 40, nowMin: 620 });
    expect(d.projectedEndMin - after.projectedEndMin).toBe(15);
  });

  it('starts ahead of the buffer when early: lunch still waits for 12:30', () => {
    // B ends 11:50 (10 min early): 40 min of buffer, nothing gained at the end.
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 1, currentStartedAtMin: 650, currentRemainingMin: 40, nowMin: 670 });
    expect(at(d, 'L')).toMatchObject({ startMin: 750, bufferBeforeMin: 40 });
    expect(d).toMatchObject({ driftMin: 0, projectedEnd: '14:00' });
  });

  it('keeps the pin at its clock time after a late start on the day, and moves it with a rehearsal on another date', () => {
    // Started 20 min late on the workshop's date: the plan counts from 10:20, lunch stays at 12:30.
    const late = driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 620 });
    const d = computeDrift({ items: PINNED, window: DAY, currentIndex: 0, currentStartedAtMin: 620, currentRemainingMin: 50, nowMin: 630, anchorMin: late.anchorMin, pinnedShiftMin: late.pinnedShiftMin });
    expect(at(d, 'L')).toMatchObject({ startMin: 750, bufferBeforeMin: 10 });
    expect(d).toMatchObject({ plannedStartMin: 620, startedLateMin: 0, driftMin: 0, projectedEnd: '14:00' });
    // A rehearsal at 23:00 the evening before: the whole day moves by 13 h, lunch to 01:30.
    const rehearsal = driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-13', startedMin: 1380 });
    const r = computeDrift({ items: PINNED, window: DAY, currentIndex: 0, currentStartedAtMin: 1380, currentRemainingMin: 60, nowMin: 1380, anchorMin: rehearsal.anchorMin, pinnedShiftMin: rehearsal.pinnedShiftMin });
    expect(at(r, 'L')).toMatchObject({ startMin: 1530, bufferBeforeMin: 30 });
    expect(r).toMatchObject({ driftMin: 0, projectedEnd: '03:00', overrunMin: 0 });
  });

  it('flows the plan and the live projection by one rule: the plan overlaps a pin, live waits for the items before it', () => {
    const items = [{ timeboxMin: 90, pinnedAt: null }, { timeboxMin: 30, pinnedAt: '11:00' }];
    expect(flowTimes(items, 600)[1]).toEqual({ startMin: 660, endMin: 690, bufferBeforeMin: 0, pinned: true, overlapUntilMin: 690 });
    expect(flowTimes(items, 600, { lateStart: 'wait' })[1]).toEqual({ startMin: 690, endMin: 720, bufferBeforeMin: 0, pinned: true, overlapUntilMin: null });
    expect(() => flowTimes(items, Number.NaN)).toThrow(RangeError);
  });
});

describe('driftAnchor', () => {
  // Worked by hand: the window starts at 10:00 (600 min); Cairn's own rule (issue of a rehearsal the evening before).
  it('keeps the plan when the session runs on the workshop date and starts on time', () => {
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 600 })).toEqual({ anchorMin: 600, reason: 'plan', lateMin: 0, earlyMin: 0, pinnedShiftMin: 0 });
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 600.5 })).toEqual({ anchorMin: 600, reason: 'plan', lateMin: 0, earlyMin: 0, pinnedShiftMin: 0 });
  });

  it('anchors at the first start when the session starts early on the day', () => {
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 585 })).toEqual({ anchorMin: 585, reason: 'early', lateMin: 0, earlyMin: 15, pinnedShiftMin: 0 });
  });

  it('reads no huge drift for a try at 07:16 on the day: the reported "164 min ahead of plan"', () => {
    // Started at 07:16, 10:00 planned: by the time of day that is 164 min early, and the console read
    // "164 min ahead". From the session's own start, 5 min into A (25 left), it runs on plan.
    const anchor = driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 436 });
    expect(anchor).toMatchObject({ anchorMin: 436, reason: 'early', earlyMin: 164 });
    const d = computeDrift({ items: SIMPLE, window: WINDOW, currentIndex: 0, currentStartedAtMin: 436, currentRemainingMin: 25, nowMin: 441, anchorMin: anchor.anchorMin, pinnedShiftMin: anchor.pinnedShiftMin });
    expect(d).toMatchObject({ plannedStartMin: 436, startedLateMin: 0, driftMin: 0, projectedEnd: '08:46' });
    // Without the anchor (drift by the time of day) it reads 164 min ahead.
    const byClock = computeDrift({ items: SIMPLE, window: WINDOW, currentIndex: 0, currentStartedAtMin: 436, currentRemainingMin: 25, nowMin: 441 });
    expect(byClock.driftMin).toBe(-164);
  });

  it("measures a rehearsal that begins at a later item against that item's own planned time", () => {
    // A rehearsal at 23:00 that starts with C (planned 10:50, 50 min after the window's start): C is
    // planned 23:00–23:40; 10 min in with 30 left it is on plan, not "50 min ahead".
    const anchor = driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-13', startedMin: 1380, firstItemOffsetMin: 50 });
    expect(anchor).toEqual({ anchorMin: 1330, reason: 'other_date', lateMin: 0, earlyMin: 0, pinnedShiftMin: 730 });
    const d = computeDrift({ items: SIMPLE, window: WINDOW, currentIndex: 2, currentStartedAtMin: 1380, currentRemainingMin: 30, nowMin: 1390, anchorMin: anchor.anchorMin, pinnedShiftMin: anchor.pinnedShiftMin });
    expect(d).toMatchObject({ plannedStartMin: 1380, startedLateMin: 0, driftMin: 0, projectedEnd: '23:40', overrunMin: 0 });
    // 10 min over on C: 10 min behind, whatever the time of day.
    expect(computeDrift({ items: SIMPLE, window: WINDOW, currentIndex: 2, currentStartedAtMin: 1380, currentRemainingMin: -10, nowMin: 1430, anchorMin: anchor.anchorMin, pinnedShiftMin: anchor.pinnedShiftMin }).driftMin).toBe(10);
    // On the day, starting C on time at 10:50 is on plan.
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 650, firstItemOffsetMin: 50 })).toMatchObject({ anchorMin: 600, reason: 'plan' });
  });

  it('anchors at the first start when the session starts late on the day', () => {
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 612 })).toEqual({ anchorMin: 612, reason: 'late', lateMin: 12, earlyMin: 0, pinnedShiftMin: 0 });
  });

  it('anchors at the first start on any other date, early or late in the day', () => {
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-13', startedMin: 23 * 60 })).toEqual({ anchorMin: 1380, reason: 'other_date', lateMin: 0, earlyMin: 0, pinnedShiftMin: 780 });
    expect(driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-20', startedMin: 480 })).toEqual({ anchorMin: 480, reason: 'other_date', lateMin: 0, earlyMin: 0, pinnedShiftMin: -120 });
  });

  it('measures a rehearsal at 23:00 against its own start, not the time of day', () => {
    // The reported case: a rehearsal the evening before read "784 min behind plan". Anchored at 23:00,
    // 5 min into A (30 min, 25 left) the session is on plan and ends 90 min after it began: 00:30.
    const anchor = driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-13', startedMin: 1380 });
    const d = computeDrift({
      items: SIMPLE,
      window: WINDOW,
      currentIndex: 0,
      currentStartedAtMin: 1380,
      currentRemainingMin: 25,
      nowMin: 1385,
      anchorMin: anchor.anchorMin,
    });
    expect(d).toMatchObject({ plannedStartMin: 1380, startedLateMin: 0, driftMin: 0, projectedEnd: '00:30', overrunMin: 0 });
  });

  it('measures a late start from the first item, so the late minutes are not drift', () => {
    // Started 12 min late at 10:12; 10 min into A with 20 left: on plan from its own start, ending 11:42.
    const d = computeDrift({ items: SIMPLE, window: WINDOW, currentIndex: 0, currentStartedAtMin: 612, currentRemainingMin: 20, nowMin: 622, anchorMin: 612 });
    expect(d).toMatchObject({ driftMin: 0, projectedEnd: '11:42', overrunMin: 0 });
  });
});

describe('cuts to the live run and their undo', () => {
  const items = [item('A', 'interview', 30, 20), item('B', 'insights', 20, 13), item('C', 'sketch', 40, 27)];

  it("changes the run's timeboxes only, never below the shortest, and keeps what was there before", () => {
    const run = cutRunTimeboxes({ timeboxes: {}, before: null }, items, [
      { itemId: 'B', toMin: 15 },
      { itemId: 'C', toMin: 10 },
    ]);
    expect(run).toEqual({ timeboxes: { B: 15, C: 27 }, before: {} });
    expect(items.map((i) => i.timeboxMin)).toEqual([30, 20, 40]);
    expect(withRunTimeboxes(items, run.timeboxes).map((i) => i.timeboxMin)).toEqual([30, 15, 27]);
  });

  it('undoes the last cut in one step, and a second undo changes nothing', () => {
    const first = cutRunTimeboxes({ timeboxes: {}, before: null }, items, [{ itemId: 'B', toMin: 15 }]);
    const second = cutRunTimeboxes(first, items, [{ itemId: 'C', toMin: 30 }]);
    expect(second).toEqual({ timeboxes: { B: 15, C: 30 }, before: { B: 15 } });
    const undone = undoRunCut(second);
    expect(undone).toEqual({ timeboxes: { B: 15 }, before: null });
    expect(undoRunCut(undone)).toBe(undone);
  });

  it('a cut back to the planned timebox leaves no override', () => {
    const run = cutRunTimeboxes({ timeboxes: { B: 15 }, before: null }, items, [{ itemId: 'B', toMin: 20 }]);
    expect(run.timeboxes).toEqual({});
  });
});
