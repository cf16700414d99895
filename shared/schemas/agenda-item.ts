import { z } from 'zod';
import { ClockTime } from './day-window';

/** Every activity type Cairn can put on an agenda (the trade's names, plus Cairn's own). */
export const ActivityType = z.enum([
  'welcome',
  'icebreaker',
  'interview',
  'empathy_map',
  'insights',
  'point_of_view',
  'how_might_we',
  'dot_vote',
  'preference_vote',
  'team_sort',
  'sketch',
  'storyboard',
  'test_rounds',
  'break',
  'lunch',
  'talk',
  'closing',
]);
/** An activity type name, e.g. `'dot_vote'`. */
export type ActivityType = z.infer<typeof ActivityType>;

/** Phases of a design workshop, in the order a day runs them (breaks sit outside the order). */
export const Phase = z.enum([
  'opening',
  'empathize',
  'define',
  'ideate',
  'prototype',
  'test',
  'closing',
  'break',
]);
/** A phase name, e.g. `'ideate'`. */
export type Phase = z.infer<typeof Phase>;

/** Longest wording of what a dot means under a criterion. */
export const MAX_CRITERION_HINT = 120;

/** A voting criterion of a dot vote, e.g. impact or effort. */
export const Criterion = z.object({
  id: z.string().min(1).max(40),
  label: z.string().trim().min(1).max(60),
  /** What a dot means, in the facilitator's words, shown on the phone ("a dot for each idea that would be easy to do"). */
  hint: z.string().trim().max(MAX_CRITERION_HINT).optional(),
  /** Whether a dot says the option is high on the criterion (impact) or low on it (effort: easy to do); high when unset. */
  dotMeans: z.enum(['high', 'low']).optional(),
});
/** A voting criterion. */
export type Criterion = z.infer<typeof Criterion>;

/** Type-specific settings of an agenda item; every field is optional and only some types read each. */
export const ActivitySettings = z
  .object({
    /** Dot vote: dots each voter may spend (per criterion). */
    dotsPerVoter: z.number().int().min(1).max(50).optional(),
    /** Dot vote: most dots one voter may put on one option. */
    capPerOption: z.number().int().min(1).max(50).optional(),
    /** Dot vote: whether a voter may put more than one dot on an option. */
    allowStacking: z.boolean().optional(),
    /** Dot vote: criteria (none means one overall criterion). */
    criteria: z.array(Criterion).max(4).optional(),
    /** How many options to carry forward (top N). */
    topN: z.number().int().min(1).max(20).optional(),
    /** Team sort / empathy map / sketch: number of teams. */
    teamCount: z.number().int().min(1).max(12).optional(),
    /** Interview / icebreaker / test rounds: number of rounds. */
    rounds: z.number().int().min(1).max(20).optional(),
    /** Interview / icebreaker: minutes per round. */
    roundMinutes: z.number().int().min(1).max(60).optional(),
    /** Storyboard: suggested number of frames. */
    storyboardFrames: z.number().int().min(1).max(40).optional(),
    /** Empathy map: add the pains and gains quadrants. */
    painsAndGains: z.boolean().optional(),
    /** Sketch: sketches each participant is asked to make. */
    sketchesPerPerson: z.number().int().min(1).max(20).optional(),
    /** Break / lunch: snacks and water are served (adds the allergy caution). */
    snacks: z.boolean().optional(),
    /** Icebreaker: the activity asks people to move about (adds the accessibility caution). */
    movement: z.boolean().optional(),
  })
  .strict();
/** Type-specific settings of an agenda item. */
export type ActivitySettings = z.infer<typeof ActivitySettings>;

/** One timeboxed item of a workshop's agenda. */
export const AgendaItem = z.object({
  id: z.string().min(1).max(64),
  type: ActivityType,
  phase: Phase,
  title: z.string().trim().min(1, 'Give the item a title').max(120),
  /** Planned length in minutes. */
  timeboxMin: z.number().int().min(1, 'A timebox is at least 1 minute').max(480),
  /** The shortest the item may be cut to on the day, in minutes. */
  minTimeboxMin: z.number().int().min(1).max(480),
  /** What the phones show. */
  prompt: z.string().max(1000),
  settings: ActivitySettings,
  /** A clock time the item starts at whatever runs before it (lunch when the catering comes); absent: after the item before. */
  pinnedAt: ClockTime.nullish(),
});
/** One timeboxed item of a workshop's agenda. */
export type AgendaItem = z.infer<typeof AgendaItem>;

/** An agenda item as typed into the planner (no id yet, settings optional). */
export const AgendaItemInput = AgendaItem.omit({ id: true })
  .extend({ settings: ActivitySettings.default({}) })
  .refine((i) => i.minTimeboxMin <= i.timeboxMin, {
    message: 'The shortest timebox cannot be longer than the timebox',
    path: ['minTimeboxMin'],
    params: { reason: 'shortest_over_timebox' },
  });
/** An agenda item as typed into the planner. */
export type AgendaItemInput = z.infer<typeof AgendaItemInput>;
