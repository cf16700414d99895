import { isBreakItem } from './activities';
import { toClock, toMinutes } from './schedule';
import type { AgendaItem } from './schemas/agenda-item';
import type { DayWindow } from './schemas/day-window';

/** Where the live day stands; every time is in minutes since midnight (fractions allowed). */
export interface DriftInput {
  items: AgendaItem[];
  window: DayWindow;
  /** Index of the item running now. */
  currentIndex: number;
  /** When the current item actually started. */
  currentStartedAtMin: number;
  /** Minutes left on the current item's countdown (paused or not); negative once it overruns. */
  currentRemainingMin: number;
  nowMin: number;
  /** How long the finished items actually took, to show where the time went. */
  completed?: { id: string; actualMin: number }[];
}

/** The live day against the plan. */
export interface Drift {
  /** When the current item should have started by the plan. */
  plannedStartMin: number;
  /** currentStartedAtMin − plannedStartMin: positive when it started late. */
  startedLateMin: number;
  /** Projected end − planned end of the agenda: positive when behind plan. */
  driftMin: number;
  /** The agenda's end by the plan. */
  plannedEndMin: number;
  /** Now + what is left of the current item + the timeboxes of every later item. */
  projectedEndMin: number;
  projectedEnd: string;
  /** Projected end − window end: positive when the day runs past its end, negative when early. */
  overrunMin: number;
  /** Sum over the completed items of actual − planned minutes (0 when none are given). */
  completedOverMin: number;
}

/**
 * Drift of the live day: how far behind plan the agenda runs and when the day will end.
 * @example
 * computeDrift({ items, window, currentIndex: 2, currentStartedAtMin: 625, currentRemainingMin: 20, nowMin: 630 })
 */
export function computeDrift(input: DriftInput): Drift {
  const { items, window, currentIndex } = input;
  if (!Number.isInteger(currentIndex) || currentIndex < 0 || currentIndex >= items.length) {
    throw new RangeError(`No agenda item at index ${currentIndex}`);
  }
  const startMin = toMinutes(window.start);
  let plannedStartMin = startMin;
  for (let i = 0; i < currentIndex; i++) plannedStartMin += items[i]!.timeboxMin;
  let laterMin = 0;
  for (let i = currentIndex + 1; i < items.length; i++) laterMin += items[i]!.timeboxMin;

  const plannedEndMin = plannedStartMin + items[currentIndex]!.timeboxMin + laterMin;
  const projectedEndMin = input.nowMin + input.currentRemainingMin + laterMin;

  const planned = new Map(items.map((i) => [i.id, i.timeboxMin]));
  let completedOverMin = 0;
  for (const c of input.completed ?? []) {
    const p = planned.get(c.id);
    if (p !== undefined) completedOverMin += c.actualMin - p;
  }

  return {
    plannedStartMin,
    startedLateMin: input.currentStartedAtMin - plannedStartMin,
    driftMin: projectedEndMin - plannedEndMin,
    plannedEndMin,
    projectedEndMin,
    projectedEnd: toClock(projectedEndMin),
    overrunMin: projectedEndMin - toMinutes(window.end),
    completedOverMin,
  };
}

/** Suggested cuts to win back time. */
export interface Shortening {
  cuts: { itemId: string; fromMin: number; toMin: number }[];
  recoveredMin: number;
  /** Minutes that cannot be won back without cutting below the minimum timeboxes. */
  shortfallMin: number;
}

/**
 * Cuts to the items after `fromIndex` (the current item's index) that win back `minutesToRecover`
 * (rounded up to whole minutes). Breaks and lunch are never cut, no item goes below its minimum
 * timebox, and the cut is spread in proportion to each item's slack (timebox − minimum), in whole
 * minutes by largest remainder (ties go to the larger slack, then the earlier item).
 * @example suggestShortening(items, 2, 10) // { cuts: [...], recoveredMin: 10, shortfallMin: 0 }
 */
export function suggestShortening(items: AgendaItem[], fromIndex: number, minutesToRecover: number): Shortening {
  const wanted = Math.max(0, Math.ceil(minutesToRecover));
  const candidates = items
    .slice(Math.max(0, fromIndex + 1))
    .filter((item) => !isBreakItem(item))
    .map((item, order) => ({ item, order, slack: Math.max(0, item.timeboxMin - item.minTimeboxMin) }))
    .filter((c) => c.slack > 0);
  const totalSlack = candidates.reduce((sum, c) => sum + c.slack, 0);
  const target = Math.min(wanted, totalSlack);
  if (target === 0) return { cuts: [], recoveredMin: 0, shortfallMin: wanted };

  // Largest remainder: floor every share, then hand the leftover minutes to the largest fractions.
  // A share rounded up never passes the item's slack: a remainder > 0 means floor < share ≤ slack.
  // Integer arithmetic throughout, so equal remainders compare equal and the result is deterministic.
  const shares = candidates.map((c) => {
    const numerator = target * c.slack;
    const remainder = numerator % totalSlack;
    return { ...c, cut: (numerator - remainder) / totalSlack, remainder };
  });
  let leftover = target - shares.reduce((sum, s) => sum + s.cut, 0);
  const byRemainder = [...shares].sort(
    (a, b) => b.remainder - a.remainder || b.slack - a.slack || a.order - b.order,
  );
  for (const s of byRemainder) {
    if (leftover === 0 || s.remainder === 0) break;
    s.cut += 1;
    leftover -= 1;
  }

  const cuts = shares
    .filter((s) => s.cut > 0)
    .map((s) => ({ itemId: s.item.id, fromMin: s.item.timeboxMin, toMin: s.item.timeboxMin - s.cut }));
  return { cuts, recoveredMin: target, shortfallMin: wanted - target };
}
