import { z } from 'zod';
import { ACTIVITY_LIBRARY, isBreakItem } from './activities';
import { Phase, type AgendaItem } from './schemas/agenda-item';
import type { DayWindow, RuleSettings } from './schemas/day-window';
import type { Finding, MessageTable } from './wording';
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

/**
 * What a screen says of each broken rule (`scheduleWarning.<message>` in the facilitator catalogs), with the
 * values each message fills in and how they are written; `n` picks the plural form.
 */
export const SCHEDULE_MESSAGES = {
  load_above_ceiling: { pct: 'percent', ceiling: 'percent' },
  phases_out_of_order: { item: 'text', phase: 'phase', before: 'text', beforePhase: 'phase' },
  pinned_before_start: { item: 'text', at: 'clock', start: 'clock' },
  pinned_overlap: { item: 'text', at: 'clock', until: 'clock', n: 'number' },
  no_break_stretch: { n: 'number', from: 'clock', max: 'number', after: 'text', ends: 'clock' },
  no_lunch: { min: 'number' },
  short_lunch: { min: 'number' },
  lunch_off_midday: { item: 'text', at: 'clock', from: 'clock', to: 'clock' },
  talk_too_long: { item: 'text', n: 'number', max: 'number' },
  overruns_window: { end: 'clock', n: 'number', windowEnd: 'clock' },
  idle_end: { end: 'clock', n: 'number', windowEnd: 'clock' },
  day_too_short: { n: 'number', needed: 'number' },
} as const satisfies MessageTable;
/** A message a schedule warning says. */
export type ScheduleMessage = keyof typeof SCHEDULE_MESSAGES;

/** One broken rule: which items, and what the plan does (a message and its values, worded by the screen). */
export interface ScheduleWarning extends Finding<ScheduleMessage> {
  code: ScheduleWarningCode;
  itemIds: string[];
  /** The one item beside which the agenda says the message (the others are only marked). */
  atItemId?: string;
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
 * Why each rule matters, in Cairn's own words (`scheduleRule.<code>` in the facilitator catalogs), shown beside
 * the warning, with the values each fills in. Where the numbers come from stays here, in comments, and in the
 * tests: never on screen.
 * - load_above_ceiling: common practice, planned time at most 85 % of the window;
 * - phases_out_of_order: the design-thinking process runs empathize, define, ideate, prototype, test in order;
 * - no_break_stretch: published workshop-planning guides, never more than 60–90 min without a break;
 * - short_lunch: published workshop-planning guides, on a full day lunch of at least 45 min;
 * - talk_too_long: common practice, keep talks short, people learn by doing;
 * - day_too_short: common practice, each phase the day covers needs at least one activity, at its shortest;
 * - idle_end: common practice, about an hour of slack at the end;
 * - lunch_off_midday: common practice, lunch around midday on a full day.
 */
export const RULE_MESSAGES = {
  load_above_ceiling: {},
  phases_out_of_order: {},
  no_break_stretch: {},
  short_lunch: {},
  talk_too_long: {},
  overruns_window: {},
  day_too_short: {},
  pinned_overlap: {},
  idle_end: { n: 'number' },
  lunch_off_midday: { from: 'clock', to: 'clock' },
} as const satisfies Record<ScheduleWarningCode, MessageTable[string]>;

/** Why a rule matters, as a finding for the screen to word (`scheduleRule.<code>`). */
export function ruleWhy(code: ScheduleWarningCode): Finding<ScheduleWarningCode> {
  const params: Record<string, string | number> = code === 'idle_end' ? { n: IDLE_END_MIN } : code === 'lunch_off_midday' ? { from: LUNCH_FROM, to: LUNCH_TO } : {};
  return { message: code, params };
}

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
  const warn = <M extends ScheduleMessage>(code: ScheduleWarningCode, itemIds: string[], message: M, params: Record<keyof (typeof SCHEDULE_MESSAGES)[M], string | number>) =>
    warnings.push({ code, itemIds, message, params });

  if (loadPct > rules.loadCeilingPct) {
    warn('load_above_ceiling', [], 'load_above_ceiling', { pct: Math.round(loadPct * 10) / 10, ceiling: rules.loadCeilingPct });
  }

  // Phases: every activity must come at or after the latest phase seen so far.
  let latest: AgendaItem | undefined;
  for (const item of items) {
    if (isBreakItem(item)) continue;
    if (latest && PHASE_ORDER.indexOf(item.phase) < PHASE_ORDER.indexOf(latest.phase)) {
      warn('phases_out_of_order', [item.id, latest.id], 'phases_out_of_order', {
        item: item.title,
        phase: item.phase,
        before: latest.title,
        beforePhase: latest.phase,
      });
    } else {
      latest = item;
    }
  }

  for (const o of overlaps) {
    if (o.first) warn('pinned_overlap', [o.item.id], 'pinned_before_start', { item: o.item.title, at: toClock(o.pinnedMin), start: window.start });
    else warn('pinned_overlap', [o.item.id], 'pinned_overlap', { item: o.item.title, at: toClock(o.pinnedMin), until: toClock(o.runsUntil), n: o.runsUntil - o.pinnedMin });
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
        message: 'no_break_stretch',
        params: { n: stretchMin, from: from.start, max: rules.maxStretchMin, after: fit.title, ends: at.end },
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
      warn('short_lunch', [], 'no_lunch', { min: rules.minLunchMin });
    } else if (!lunches.some((l) => l.timeboxMin >= rules.minLunchMin)) {
      warn('short_lunch', lunches.map((l) => l.id), 'short_lunch', { min: rules.minLunchMin });
    }
  }

  if (fullDay) {
    const [from, to] = [toMinutes(LUNCH_FROM), toMinutes(LUNCH_TO)];
    for (const [i, item] of items.entries()) {
      if (item.type !== 'lunch') continue;
      const at = scheduled[i]!;
      if (at.startMin < from || at.startMin > to) {
        warn('lunch_off_midday', [item.id], 'lunch_off_midday', { item: item.title, at: at.start, from: LUNCH_FROM, to: LUNCH_TO });
      }
    }
  }

  for (const item of items) {
    if (ACTIVITY_LIBRARY[item.type].talkOnly && item.timeboxMin > rules.maxTalkMin) {
      warn('talk_too_long', [item.id], 'talk_too_long', { item: item.title, n: item.timeboxMin, max: rules.maxTalkMin });
    }
  }

  if (t > endMin) {
    warn('overruns_window', scheduled.filter((s) => s.endMin > endMin).map((s) => s.id), 'overruns_window', {
      end: toClock(t),
      n: t - endMin,
      windowEnd: window.end,
    });
  }

  if (items.length > 0 && endMin - t > IDLE_END_MIN) {
    warn('idle_end', [], 'idle_end', { end: toClock(t), n: endMin - t, windowEnd: window.end });
  }

  const neededMin = shortestDayMin(items);
  if (windowMin < neededMin) {
    warn('day_too_short', [], 'day_too_short', { n: windowMin, needed: neededMin });
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
