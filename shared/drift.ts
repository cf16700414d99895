import { isBreakItem } from './activities';
import { flowTimes, toClock, toMinutes } from './schedule';
import { atLeast, finite } from './numbers';
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
  /** Minutes left on the current item's countdown (paused or not); 0 or negative once it overruns (it still runs now). */
  currentRemainingMin: number;
  nowMin: number;
  /** How long the finished items actually took, to show where the time went. */
  completed?: { id: string; actualMin: number }[];
  /**
   * Where the plan starts when not at the window's start (see {@link driftAnchor}); the window's end
   * moves with it, so the session keeps the day's length. Times may then pass midnight (> 1440).
   */
  anchorMin?: number;
  /**
   * How far pinned clock times move with the anchor ({@link DriftAnchor.pinnedShiftMin}): 0 on the
   * workshop's own date, where the catering comes at 12:30 however the day started. Defaults to the
   * anchor's whole shift (the plan moves as one).
   */
  pinnedShiftMin?: number;
}

/** When an item from the current one on is now expected to run, in minutes since midnight. */
export interface ProjectedTime {
  id: string;
  startMin: number;
  endMin: number;
  /** Idle minutes left before a pinned item: the buffer still there after the drift so far. */
  bufferBeforeMin: number;
  pinned: boolean;
  /** For a pinned item: how many minutes after its fixed clock time it now starts (0 while the buffer holds). */
  lateMin: number;
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
  /**
   * Now + what is left of the current item + the later items as they flow: back to back, a pinned
   * item at its clock time or, when the items before it run past that, as soon as they end.
   */
  projectedEndMin: number;
  /** The current and later items as now expected, pinned items at their clock time while the buffer lasts. */
  projected: ProjectedTime[];
  projectedEnd: string;
  /** Projected end − window end: positive when the day runs past its end, negative when early. */
  overrunMin: number;
  /** Sum over the completed items of actual − planned minutes (0 when none are given). */
  completedOverMin: number;
}

/**
 * Drift of the live day: how far behind plan the agenda runs and when the day will end. Refuses a time,
 * a remaining time or an anchor that is not a finite number, and a timebox that is not a finite number
 * of 0 or more (RangeError naming it); completed items whose actual minutes are not a finite number are ignored.
 * @example
 * computeDrift({ items, window, currentIndex: 2, currentStartedAtMin: 625, currentRemainingMin: 20, nowMin: 630 })
 */
export function computeDrift(input: DriftInput): Drift {
  const { items, window, currentIndex } = input;
  if (!Number.isInteger(currentIndex) || currentIndex < 0 || currentIndex >= items.length) {
    throw new RangeError(`No agenda item at index ${currentIndex}`);
  }
  finite('The current item’s start', input.currentStartedAtMin);
  finite('The minutes left', input.currentRemainingMin);
  finite('The time now', input.nowMin);
  if (input.anchorMin !== undefined) finite('The anchor', input.anchorMin);
  for (const item of items) atLeast(`The timebox of “${item.title}”`, item.timeboxMin, 0);
  const shiftMin = input.anchorMin === undefined ? 0 : input.anchorMin - toMinutes(window.start);
  const pinShiftMin = input.pinnedShiftMin === undefined ? shiftMin : finite('The shift of pinned times', input.pinnedShiftMin);
  const startMin = toMinutes(window.start) + shiftMin;
  // The plan and the projection flow by the one rule of shared/schedule (flowTimes): a pinned item keeps
  // its clock time and the gap before it is buffer; live, that buffer absorbs drift before the pin moves.
  const plan = flowTimes(items, startMin, { pinShiftMin });
  const plannedStartMin = plan[currentIndex]!.startMin;
  const plannedEndMin = plan.reduce((end, p) => Math.max(end, p.endMin), startMin);

  // An item past its countdown still runs: it ends no earlier than now.
  const currentEndMin = input.nowMin + Math.max(0, input.currentRemainingMin);
  const later = flowTimes(items.slice(currentIndex + 1), currentEndMin, { pinShiftMin, lateStart: 'wait' });
  const projected: ProjectedTime[] = [
    { id: items[currentIndex]!.id, startMin: input.currentStartedAtMin, endMin: currentEndMin, bufferBeforeMin: 0, pinned: !!items[currentIndex]!.pinnedAt, lateMin: 0 },
    ...later.map((f, i) => {
      const pinnedAt = items[currentIndex + 1 + i]!.pinnedAt;
      const lateMin = pinnedAt ? Math.max(0, f.startMin - (toMinutes(pinnedAt) + pinShiftMin)) : 0;
      return { id: items[currentIndex + 1 + i]!.id, startMin: f.startMin, endMin: f.endMin, bufferBeforeMin: f.bufferBeforeMin, pinned: f.pinned, lateMin };
    }),
  ];
  const projectedEndMin = later.reduce((end, f) => Math.max(end, f.endMin), currentEndMin);

  const planned = new Map(items.map((i) => [i.id, i.timeboxMin]));
  let completedOverMin = 0;
  for (const c of input.completed ?? []) {
    const p = planned.get(c.id);
    if (p !== undefined && Number.isFinite(c.actualMin)) completedOverMin += c.actualMin - p;
  }

  return {
    plannedStartMin,
    startedLateMin: input.currentStartedAtMin - plannedStartMin,
    driftMin: projectedEndMin - plannedEndMin,
    plannedEndMin,
    projectedEndMin,
    projected,
    projectedEnd: toClock(projectedEndMin),
    overrunMin: projectedEndMin - (toMinutes(window.end) + shiftMin),
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
 * (rounded up to whole minutes) at the end of the day. Breaks and lunch are never cut, no item goes below
 * its minimum timebox. A pinned item starts at its clock time, so minutes cut before it only widen the
 * buffer before it: they win back at most how late it now starts (`pinnedLateMin`, by item id; a pinned
 * item not listed is on time, 0). The minutes are therefore taken from the last stretch first (the items
 * from the last pinned item on), then from the stretch before, up to what the pins after it let through;
 * within a stretch the cut is spread in proportion to each item's slack (timebox − minimum), in whole
 * minutes by largest remainder (ties go to the larger slack, then the earlier item). Refuses minutes to
 * recover or an index that are not finite numbers; items whose timebox or minimum is not a finite number
 * are ignored (never cut).
 * @example suggestShortening(items, 2, 10) // { cuts: [...], recoveredMin: 10, shortfallMin: 0 }
 */
export function suggestShortening(
  items: AgendaItem[],
  fromIndex: number,
  minutesToRecover: number,
  pinnedLateMin: Record<string, number> = {},
): Shortening {
  finite('The index', fromIndex);
  finite('The minutes to recover', minutesToRecover);
  const wanted = Math.max(0, Math.ceil(minutesToRecover));
  // Stretches of the later items, each starting at a pinned item (the first at the item after the current one).
  const stretches: { lateMin: number; items: AgendaItem[] }[] = [];
  for (const item of items.slice(Math.max(0, fromIndex + 1))) {
    if (item.pinnedAt || stretches.length === 0) {
      const late = pinnedLateMin[item.id] ?? 0;
      // The first stretch, when no pinned item opens it, has no clock time to wait for.
      const lateMin = item.pinnedAt ? (Number.isFinite(late) ? Math.max(0, Math.floor(late)) : 0) : Infinity;
      stretches.push({ lateMin, items: [] });
    }
    stretches.at(-1)!.items.push(item);
  }
  const cuts: Shortening['cuts'] = [];
  let left = wanted;
  // What may still pass every pinned item after the stretch being cut.
  let passes = Infinity;
  for (let k = stretches.length - 1; k >= 0 && left > 0 && passes > 0; k--) {
    const stretch = stretches[k]!;
    const take = spreadCut(stretch.items, Math.min(left, passes));
    cuts.unshift(...take.cuts);
    left -= take.recoveredMin;
    // Minutes cut before this stretch's pinned item reach past it only while it starts late.
    passes = Math.min(passes - take.recoveredMin, stretch.lateMin);
  }
  return { cuts, recoveredMin: wanted - left, shortfallMin: left };
}

/** Cuts up to `wanted` whole minutes from the items, in proportion to their slack by largest remainder. */
function spreadCut(items: AgendaItem[], wanted: number): Omit<Shortening, 'shortfallMin'> {
  const candidates = items
    .filter((item) => !isBreakItem(item) && Number.isFinite(item.timeboxMin) && Number.isFinite(item.minTimeboxMin))
    .map((item, order) => ({ item, order, slack: Math.max(0, item.timeboxMin - item.minTimeboxMin) }))
    .filter((c) => c.slack > 0);
  const totalSlack = candidates.reduce((sum, c) => sum + c.slack, 0);
  const target = Math.min(wanted, totalSlack);
  if (target === 0) return { cuts: [], recoveredMin: 0 };

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
  return { cuts, recoveredMin: target };
}

/** A live run's own timeboxes (agenda item id → minutes) and those before its last cut, for the undo. */
export interface RunTimeboxes {
  timeboxes: Record<string, number>;
  /** The timeboxes before the last cut; `null` when there is nothing to undo. */
  before: Record<string, number> | null;
}

/**
 * The agenda as the live run has it: each item's timebox replaced by the run's own where cuts set one;
 * a run timebox that is not a finite number of 0 or more is ignored (the plan's stands).
 * @example withRunTimeboxes(items, { [items[3].id]: 15 })
 */
export function withRunTimeboxes<T extends Pick<AgendaItem, 'id' | 'timeboxMin'>>(items: T[], timeboxes: Record<string, number>): T[] {
  return items.map((i) => {
    const run = timeboxes[i.id];
    return run === undefined || !Number.isFinite(run) || run < 0 ? i : { ...i, timeboxMin: run };
  });
}

/**
 * Applies cuts to a live run's timeboxes only (the stored plan is untouched), never below an item's
 * shortest timebox; what the run had before is kept so the cut can be undone in one step. A cut to a
 * number of minutes that is not finite is ignored.
 * @example cutRunTimeboxes({ timeboxes: {}, before: null }, items, [{ itemId: 'sketch', toMin: 15 }])
 */
export function cutRunTimeboxes(
  run: RunTimeboxes,
  items: Pick<AgendaItem, 'id' | 'timeboxMin' | 'minTimeboxMin'>[],
  cuts: { itemId: string; toMin: number }[],
): RunTimeboxes {
  const planned = new Map(items.map((i) => [i.id, i]));
  const next = { ...run.timeboxes };
  for (const cut of cuts) {
    const item = planned.get(cut.itemId);
    if (!item || !Number.isFinite(cut.toMin)) continue;
    const toMin = Math.max(item.minTimeboxMin, Math.round(cut.toMin));
    if (toMin === item.timeboxMin) delete next[item.id];
    else next[item.id] = toMin;
  }
  return { timeboxes: next, before: { ...run.timeboxes } };
}

/**
 * Undoes the last cut: the run's timeboxes go back to what they were before it; a second undo has
 * nothing left to undo and changes nothing.
 * @example undoRunCut({ timeboxes: { a: 10 }, before: {} }) // { timeboxes: {}, before: null }
 */
export function undoRunCut(run: RunTimeboxes): RunTimeboxes {
  if (run.before === null) return run;
  return { timeboxes: { ...run.before }, before: null };
}

/** Why the live drift is measured from where it is. */
export type DriftAnchorReason = 'plan' | 'other_date' | 'late' | 'early';

/** Where the planned times of a live session start. */
export interface DriftAnchor {
  /** Where the plan's first item is taken to start, in minutes since midnight of the day the session started. */
  anchorMin: number;
  reason: DriftAnchorReason;
  /** How late the first run item started against the plan (0 unless `reason` is `'late'`). */
  lateMin: number;
  /** How early the first run item started against the plan (0 unless `reason` is `'early'`). */
  earlyMin: number;
  /**
   * How far pinned clock times move: 0 on the workshop's date (lunch pinned at 12:30 stays at 12:30
   * when the day started late or early: the buffer before it takes the difference), the whole shift on
   * another date (a rehearsal keeps the day's shape).
   */
  pinnedShiftMin: number;
}

/**
 * Where the planned times of a live session are anchored, so drift compares the time the activities
 * took with their planned timeboxes from the session's actual start: at the plan's own start (the day
 * window) when the session runs on the workshop's date and its first item started on time (within the
 * grace); else at the moment the first item actually started, less the planned minutes before that item
 * (a rehearsal that begins at the sketching still measures the sketching against its own timebox) —
 * whether it runs on another date (a rehearsal the evening before), starts late, or starts early (a try
 * at 07:16 on the day is not "164 min ahead of plan"). Never against the time of day on another date.
 * @example driftAnchor({ workshopDate: '2026-05-14', windowStartMin: 600, startedDate: '2026-05-14', startedMin: 612 })
 *   // { anchorMin: 612, reason: 'late', lateMin: 12, earlyMin: 0, pinnedShiftMin: 0 }
 * Refuses minutes (the window's start, the start, the offset, the grace) that are not finite numbers.
 */
export function driftAnchor(input: {
  workshopDate: string;
  /** The plan's start (the day window's start), minutes since midnight. */
  windowStartMin: number;
  /** The local date on which the session's first item started (YYYY-MM-DD). */
  startedDate: string;
  /** When the first item started, minutes since midnight of `startedDate`. */
  startedMin: number;
  /** Planned minutes from the window's start to the start of the item the session ran first (default 0: the first item). */
  firstItemOffsetMin?: number;
  /** A difference below this many minutes counts as on time (default 1). */
  graceMin?: number;
}): DriftAnchor {
  finite('The window’s start', input.windowStartMin);
  finite('The start', input.startedMin);
  const offset = finite('The offset of the first item run', input.firstItemOffsetMin ?? 0);
  const grace = finite('The grace', input.graceMin ?? 1);
  const anchorMin = input.startedMin - offset;
  if (input.startedDate !== input.workshopDate) {
    return { anchorMin, reason: 'other_date', lateMin: 0, earlyMin: 0, pinnedShiftMin: anchorMin - input.windowStartMin };
  }
  const late = anchorMin - input.windowStartMin;
  if (late >= grace) return { anchorMin, reason: 'late', lateMin: late, earlyMin: 0, pinnedShiftMin: 0 };
  if (-late >= grace) return { anchorMin, reason: 'early', lateMin: 0, earlyMin: -late, pinnedShiftMin: 0 };
  return { anchorMin: input.windowStartMin, reason: 'plan', lateMin: 0, earlyMin: 0, pinnedShiftMin: 0 };
}
