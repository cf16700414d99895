import { z } from 'zod';

/** A clock time of day as `HH:MM` (24-hour). */
export const ClockTime = z
  .string()
  .refine((s) => /^([01]\d|2[0-3]):[0-5]\d$/.test(s), { message: 'Use a 24-hour time such as 09:30', params: { reason: 'clock_time' } });
/** A clock time of day as `HH:MM`. */
export type ClockTime = z.infer<typeof ClockTime>;

// The order checks only speak once every time is well written, so a typo gets one message, not three.
const allTimes = (w: Record<'doorsOpen' | 'doorsClose' | 'start' | 'end', unknown>) =>
  [w.doorsOpen, w.doorsClose, w.start, w.end].every((t) => ClockTime.safeParse(t).success);

/** The day window of a workshop: doors open and close, the workshop itself runs inside. */
export const DayWindow = z
  .object({
    doorsOpen: ClockTime,
    doorsClose: ClockTime,
    start: ClockTime,
    end: ClockTime,
  })
  .refine((w) => !allTimes(w) || w.doorsOpen <= w.start, { message: 'The workshop cannot start before the doors open', path: ['start'], params: { reason: 'start_before_doors' } })
  .refine((w) => !allTimes(w) || w.start < w.end, { message: 'The workshop must end after it starts', path: ['end'], params: { reason: 'end_after_start' } })
  .refine((w) => !allTimes(w) || w.end <= w.doorsClose, { message: 'The workshop must end before the doors close', path: ['end'], params: { reason: 'end_before_doors_close' } });
/** The day window of a workshop. */
export type DayWindow = z.infer<typeof DayWindow>;

/** Thresholds of the planning rules; each is a workshop setting with the trade's default. */
export const RuleSettings = z.object({
  /** Planned time as a share of the window above which Cairn warns (percent). */
  loadCeilingPct: z.number().min(10).max(100).default(85),
  /** Longest stretch without a break, in minutes. */
  maxStretchMin: z.number().int().min(15).max(480).default(90),
  /** Shortest lunch on a full day, in minutes. */
  minLunchMin: z.number().int().min(0).max(180).default(45),
  /** Longest talk-only item, in minutes. */
  maxTalkMin: z.number().int().min(1).max(240).default(20),
  /** A workshop window this long or longer counts as a full day, in minutes. */
  fullDayMin: z.number().int().min(60).max(720).default(300),
});
/** Thresholds of the planning rules. */
export type RuleSettings = z.infer<typeof RuleSettings>;
