import { z } from 'zod';
import { ACTIVITY_LIBRARY, PHASE_LABELS, isBreakItem } from './activities';
import { Phase, type AgendaItem } from './schemas/agenda-item';
import type { DayWindow, RuleSettings } from './schemas/day-window';
import { percentText } from './words';
import { atLeast, finite } from './numbers';

/** The rules of the trade a plan can break. */
export const ScheduleWarningCode = z.enum([
  'load_above_ceiling',
  'phases_out_of_order',
  'no_break_stretch',
  'short_lunch',
  'talk_too_long',
  'overruns_window',
  'day_too_short',
  'pinned_overlap',
  'idle_end',
  'lunch_off_midday',
]);
/** A schedule warning's code. */
export type ScheduleWarningCode = z.infer<typeof ScheduleWarningCode>;

/** One broken rule: which items, a plain explanation, and where the rule comes from. */
export interface ScheduleWarning {
  code: ScheduleWarningCode;
  itemIds: string[];
  /** The one item beside which the agenda says the message (the others are only marked). */
  atItemId?: string;
  message: string;
  origin: string;
}

/** When one agenda item runs, in minutes since midnight and as clock times. */
export interface ScheduledItem {
  id: string;
  startMin: number;
  endMin: number;
  start: string;
  end: string;
  /** Idle minutes before the item: the gap a pinned item leaves after the item before it. */
  bufferBeforeMin: number;
  /** The item starts at a pinned clock time rather than after the item before. */
  pinned: boolean;
}

/** The computed day: item times, load against the window, and the rules the plan breaks. */
export interface Schedule {
  items: ScheduledItem[];
  /** Sum of all timeboxes, breaks included (buffers before pinned items are slack, not planned time). */
  plannedMin: number;
  /** Minutes from the window's start to its end. */
  windowMin: number;
  /** plannedMin as a percentage of windowMin (not rounded). */
  loadPct: number;
  endsAt: string;
  fullDay: boolean;
  warnings: ScheduleWarning[];
}

/** Idle minutes at the end of the window above which Cairn warns (common practice: about an hour of slack). */
export const IDLE_END_MIN = 90;
/** On a full day lunch starts in this span (common practice). */
export const LUNCH_FROM = '11:30';
/** On a full day lunch starts in this span (common practice). */
export const LUNCH_TO = '14:00';

/**
 * Why each rule matters, in Cairn's own words, shown beside the warning. Where the numbers come from
 * stays here, in comments, and in the tests: never on screen.
 */
export const RULE_ORIGINS: Record<ScheduleWarningCode, string> = {
  // Common practice: planned time at most 85 % of the window.
  load_above_ceiling: 'leave slack in the plan: a day always runs over somewhere',
  // The design-thinking process runs empathize, define, ideate, prototype, test in order.
  phases_out_of_order: 'each phase builds on what the one before it found, so the day runs them in order',
  // Published workshop-planning guides: never more than 60–90 min without a break.
  no_break_stretch: 'people stop listening well after an hour or so without a pause',
  // Published workshop-planning guides: on a full day, lunch of at least 45 min.
  short_lunch: 'a full day needs a real meal away from the work, not a quick bite',
  // Common practice: keep talks short, people learn by doing.
  talk_too_long: 'people learn by doing: keep talk from the front short',
  overruns_window: 'the day window set in the brief',
  // Common practice: each phase the day covers needs at least one activity, at its shortest.
  day_too_short: 'each phase the day covers needs at least one activity, even at its shortest',
  pinned_overlap: 'the clock time the item is pinned to (e.g. when the catering arrives)',
  // Common practice: about an hour of slack at the end.
  idle_end: `about an hour of slack at the end is enough; more than ${IDLE_END_MIN} min leaves the room waiting`,
  // Common practice: lunch around midday on a full day.
  lunch_off_midday: `people get hungry around midday: on a full day lunch starts between ${LUNCH_FROM} and ${LUNCH_TO}`,
};

/** The phases a design day needs when the agenda is still empty. */
export const CORE_PHASES: readonly Phase[] = ['empathize', 'define', 'ideate', 'prototype', 'test'];

// The schema lists the phases in the order a day runs them; breaks sit outside the order.
const PHASE_ORDER: readonly Phase[] = Phase.options.filter((p) => p !== 'break');

/**
 * Minutes since midnight of a `HH:MM` clock time; refuses anything but a time of day (00:00–23:59), e.g. "25:99".
 * @example toMinutes('09:30') // 570
 */
export function toMinutes(clock: string): number {
  const match = /^(\d{1,2}):(\d{2})$/.exec(clock);
  if (!match) throw new RangeError(`Not a HH:MM time: ${clock}`);
  const hours = Number(match[1]);
  const minutes = Number(match[2]);
  if (hours > 23 || minutes > 59) throw new RangeError(`Not a time of day: ${clock} (hours 00–23, minutes 00–59)`);
  return hours * 60 + minutes;
}

/**
 * The `HH:MM` clock time of minutes since midnight, rounded to the minute and wrapped past midnight.
 * Refuses minutes that are not a finite number.
 * @example toClock(570) // '09:30'
 */
export function toClock(min: number): string {
  finite('Minutes since midnight', min);
  const day = 24 * 60;
  const m = ((Math.round(min) % day) + day) % day;
  return `${String(Math.floor(m / 60)).padStart(2, '0')}:${String(m % 60).padStart(2, '0')}`;
}

/** When one item runs as the agenda flows (see {@link flowTimes}), in minutes since midnight. */
export interface FlowedTime {
  startMin: number;
  endMin: number;
  /** Idle minutes before a pinned item whose clock time comes after the items before it end. */
  bufferBeforeMin: number;
  pinned: boolean;
  /** When the items before a pinned item run past its clock time: when they end (the overlap's end); else null. */
  overlapUntilMin: number | null;
}

/**
 * The one rule of how an agenda flows, for the plan and the live projection alike: items run back to
 * back from `startMin`; a pinned item starts at its clock time (moved by `pinShiftMin`, e.g. for a
 * rehearsal on another date), leaving a buffer when the items before it end earlier. In the plan
 * (`lateStart: 'overlap'`) a pinned item still starts at its time when the items before it run later
 * (an overlap, which the plan warns about); live (`lateStart: 'wait'`) it starts when they end, so
 * a buffer absorbs drift and only drift beyond it moves the pinned item.
 * @example flowTimes([{ timeboxMin: 30, pinnedAt: null }, { timeboxMin: 60, pinnedAt: '12:30' }], 600)[1] // { startMin: 750, endMin: 810, bufferBeforeMin: 120, … }
 */
export function flowTimes(
  items: readonly Pick<AgendaItem, 'timeboxMin' | 'pinnedAt'>[],
  startMin: number,
  options: { pinShiftMin?: number; lateStart?: 'overlap' | 'wait' } = {},
): FlowedTime[] {
  finite('The start', startMin);
  const shift = finite('The shift of pinned times', options.pinShiftMin ?? 0);
  let t = startMin;
  return items.map((item) => {
    let s = t;
    let bufferBeforeMin = 0;
    let overlapUntilMin: number | null = null;
    if (item.pinnedAt) {
      const p = toMinutes(item.pinnedAt) + shift;
      if (p >= t) {
        bufferBeforeMin = p - t;
        s = p;
      } else if (options.lateStart !== 'wait') {
        overlapUntilMin = t;
        s = p;
      }
    }
    const e = s + item.timeboxMin;
    t = Math.max(t, e);
    return { startMin: s, endMin: e, bufferBeforeMin, pinned: !!item.pinnedAt, overlapUntilMin };
  });
}

/**
 * Lays the items out from the window's start ({@link flowTimes}: back to back, pinned items at their
 * clock time) and checks the plan against the rules.
 * Load counts every planned minute, breaks included, against the window from start to end.
 * "Day too short": the window cannot hold, at their shortest, one activity of each phase the agenda
 * uses (the shortest of the agenda's own items of that phase; with no activities yet, the shortest
 * library activity of each of the five core phases). Opening and closing count when used.
 * Refuses a window that ends at or before its start (the load would read "Infinity %") and a timebox
 * that is not a finite number of 0 or more (RangeError naming it).
 * @example computeSchedule(items, { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' }, rules)
 */
export function computeSchedule(items: AgendaItem[], window: DayWindow, rules: RuleSettings): Schedule {
  const startMin = toMinutes(window.start);
  const endMin = toMinutes(window.end);
  const windowMin = endMin - startMin;
  if (windowMin <= 0) throw new RangeError(`The workshop ends at ${window.end}, not after it starts at ${window.start}`);
  for (const item of items) atLeast(`The timebox of “${item.title}”`, item.timeboxMin, 0);

  const overlaps: { item: AgendaItem; pinnedMin: number; runsUntil: number; first: boolean }[] = [];
  const scheduled: ScheduledItem[] = flowTimes(items, startMin).map((f, i) => {
    const item = items[i]!;
    if (f.overlapUntilMin !== null) overlaps.push({ item, pinnedMin: f.startMin, runsUntil: f.overlapUntilMin, first: i === 0 });
    return { id: item.id, startMin: f.startMin, endMin: f.endMin, start: toClock(f.startMin), end: toClock(f.endMin), bufferBeforeMin: f.bufferBeforeMin, pinned: f.pinned };
  });
  // When the last item to finish ends (a pinned item may end before the items it overlaps).
  const t = scheduled.reduce((end, x) => Math.max(end, x.endMin), startMin);
  const plannedMin = items.reduce((sum, item) => sum + item.timeboxMin, 0);
  // Multiply first: 306 × 100 / 360 is exactly 85, where 306 / 360 × 100 is not.
  const loadPct = (plannedMin * 100) / windowMin;
  const fullDay = windowMin >= rules.fullDayMin;

  const warnings: ScheduleWarning[] = [];
  const warn = (code: ScheduleWarningCode, itemIds: string[], message: string) =>
    warnings.push({ code, itemIds, message, origin: RULE_ORIGINS[code] });

  if (loadPct > rules.loadCeilingPct) {
    warn(
      'load_above_ceiling',
      [],
      `The plan fills ${percentText(loadPct, 1)} of the day, above the ${percentText(rules.loadCeilingPct)} ceiling. ` +
        'Leave some slack: agendas always run over.',
    );
  }

  // Phases: every activity must come at or after the latest phase seen so far.
  let latest: AgendaItem | undefined;
  for (const item of items) {
    if (isBreakItem(item)) continue;
    if (latest && PHASE_ORDER.indexOf(item.phase) < PHASE_ORDER.indexOf(latest.phase)) {
      warn(
        'phases_out_of_order',
        [item.id, latest.id],
        `“${item.title}” (${PHASE_LABELS[item.phase]}) comes after “${latest.title}” ` +
          `(${PHASE_LABELS[latest.phase]}). ` +
          'Run the phases in order.',
      );
    } else {
      latest = item;
    }
  }

  for (const o of overlaps) {
    warn(
      'pinned_overlap',
      [o.item.id],
      o.first
        ? `“${o.item.title}” is pinned at ${toClock(o.pinnedMin)}, before the workshop starts at ${window.start}.`
        : `“${o.item.title}” is pinned at ${toClock(o.pinnedMin)}, but the items before it run until ${toClock(o.runsUntil)}: ` +
            `${o.runsUntil - o.pinnedMin} min overlap. Shorten or move an item before it.`,
    );
  }

  // Stretches of activities between breaks.
  let stretch: AgendaItem[] = [];
  let stretchMin = 0;
  const closeStretch = () => {
    if (stretchMin > rules.maxStretchMin) {
      const from = scheduled[items.indexOf(stretch[0]!)]!;
      // A break fits after the last item that still ends within the limit (or after the first item).
      let fit = stretch[0]!;
      let sum = 0;
      for (const item of stretch) {
        sum += item.timeboxMin;
        if (sum > rules.maxStretchMin) break;
        fit = item;
      }
      const at = scheduled[items.indexOf(fit)]!;
      warnings.push({
        code: 'no_break_stretch',
        itemIds: stretch.map((i) => i.id),
        atItemId: fit.id,
        message:
          `${stretchMin} min without a break from ${from.start}, longer than ${rules.maxStretchMin} min. ` +
          `A break would fit after “${fit.title}” (ends ${at.end}).`,
        origin: RULE_ORIGINS.no_break_stretch,
      });
    }
    stretch = [];
    stretchMin = 0;
  };
  for (const item of items) {
    if (isBreakItem(item)) {
      closeStretch();
    } else {
      stretch.push(item);
      stretchMin += item.timeboxMin;
    }
  }
  closeStretch();

  if (fullDay) {
    const lunches = items.filter((i) => i.type === 'lunch');
    if (lunches.length === 0) {
      warn('short_lunch', [], `A full day needs a lunch break of at least ${rules.minLunchMin} min.`);
    } else if (!lunches.some((l) => l.timeboxMin >= rules.minLunchMin)) {
      warn(
        'short_lunch',
        lunches.map((l) => l.id),
        `Lunch is shorter than ${rules.minLunchMin} min. On a full day people need a proper break.`,
      );
    }
  }

  if (fullDay) {
    const [from, to] = [toMinutes(LUNCH_FROM), toMinutes(LUNCH_TO)];
    for (const [i, item] of items.entries()) {
      if (item.type !== 'lunch') continue;
      const at = scheduled[i]!;
      if (at.startMin < from || at.startMin > to) {
        warn(
          'lunch_off_midday',
          [item.id],
          `“${item.title}” starts at ${at.start}, outside ${LUNCH_FROM}–${LUNCH_TO}. Pin it to a time around midday.`,
        );
      }
    }
  }

  for (const item of items) {
    if (ACTIVITY_LIBRARY[item.type].talkOnly && item.timeboxMin > rules.maxTalkMin) {
      warn(
        'talk_too_long',
        [item.id],
        `“${item.title}” is ${item.timeboxMin} min of talk, over ${rules.maxTalkMin} min. ` +
          'Shorten it or turn part of it into an activity.',
      );
    }
  }

  if (t > endMin) {
    warn(
      'overruns_window',
      scheduled.filter((s) => s.endMin > endMin).map((s) => s.id),
      `The plan ends at ${toClock(t)}, ${t - endMin} min after the workshop should end at ${window.end}.`,
    );
  }

  if (items.length > 0 && endMin - t > IDLE_END_MIN) {
    warn(
      'idle_end',
      [],
      `The plan ends at ${toClock(t)}, ${endMin - t} min before the workshop ends at ${window.end}. ` +
        'Plan more, or end the day earlier.',
    );
  }

  const neededMin = shortestDayMin(items);
  if (windowMin < neededMin) {
    warn(
      'day_too_short',
      [],
      `The day is ${windowMin} min long, but one activity of each phase needs at least ${neededMin} min. ` +
        'Lengthen the day or cover fewer phases.',
    );
  }

  return {
    items: scheduled,
    plannedMin,
    windowMin,
    loadPct,
    endsAt: toClock(t),
    fullDay,
    warnings,
  };
}

/**
 * The fewest minutes a day needs: for each phase the agenda's activities use, the shortest minimum
 * timebox among them; with no activities, the shortest library activity of each core phase. Ignores a
 * minimum timebox that is not a finite number of 0 or more (that item does not count).
 * @example shortestDayMin([]) // sum over empathize … test of the library's shortest minimums
 */
export function shortestDayMin(items: AgendaItem[]): number {
  const byPhase = new Map<Phase, number>();
  for (const item of items) {
    if (isBreakItem(item) || !(Number.isFinite(item.minTimeboxMin) && item.minTimeboxMin >= 0)) continue;
    byPhase.set(item.phase, Math.min(byPhase.get(item.phase) ?? Infinity, item.minTimeboxMin));
  }
  if (byPhase.size === 0) {
    for (const def of Object.values(ACTIVITY_LIBRARY)) {
      if (!CORE_PHASES.includes(def.phase) || def.isBreak) continue;
      byPhase.set(def.phase, Math.min(byPhase.get(def.phase) ?? Infinity, def.minTimeboxMin));
    }
  }
  let sum = 0;
  for (const min of byPhase.values()) sum += min;
  return sum;
}
