import { ACTIVITY_LIBRARY, defaultMinTimebox } from './activities';
import type { ActivitySettings, ActivityType, AgendaItem } from './schemas/agenda-item';
import type { DayWindow } from './schemas/day-window';

/** The id of one of Cairn's agenda templates. */
export type TemplateId = 'full-day' | 'half-day';

/** An agenda to start a plan from: a day window and items without ids. */
export interface AgendaTemplate {
  id: TemplateId;
  name: string;
  description: string;
  window: DayWindow;
  items: Omit<AgendaItem, 'id'>[];
}

interface ItemOverrides {
  title?: string;
  timeboxMin?: number;
  prompt?: string;
  settings?: ActivitySettings;
}

// A template item from the library's defaults; a shorter timebox gets a minimum of two thirds of it.
function step(type: ActivityType, overrides: ItemOverrides = {}): Omit<AgendaItem, 'id'> {
  const def = ACTIVITY_LIBRARY[type];
  const timeboxMin = overrides.timeboxMin ?? def.defaultTimeboxMin;
  return {
    type,
    phase: def.phase,
    title: overrides.title ?? def.label,
    timeboxMin,
    minTimeboxMin: def.isBreak ? timeboxMin : Math.min(def.minTimeboxMin, defaultMinTimebox(timeboxMin)),
    prompt: overrides.prompt ?? def.defaultPrompt,
    settings: { ...structuredClone(def.defaultSettings), ...overrides.settings },
  };
}

// Both templates use the Harbour Lane Bike Co-op demo scenario: a new member's first ride.
const FULL_DAY: AgendaTemplate = {
  id: 'full-day',
  name: 'Full day',
  description:
    'Doors 09:00–17:00, workshop 10:00–16:00: every phase from interviews to test rounds, ' +
    'a morning break, lunch and two afternoon breaks, with an hour of slack for the day to run over.',
  window: { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' },
  items: [
    step('welcome', {
      title: 'Welcome and plan for the day',
      prompt:
        "Welcome! Today we look at a new member's first ride with Harbour Lane Bike Co-op. " +
        'Here is the plan, and how we look after what you share.',
    }),
    step('icebreaker', {
      title: 'First bikes',
      timeboxMin: 10,
      settings: { rounds: 2, roundMinutes: 3 },
      prompt: 'Find your partner on your screen and tell each other about the first bike you remember riding.',
    }),
    step('interview', {
      title: 'Interviews: a first ride',
      prompt:
        'Ask your partner about a time they rode somewhere new for the first time. What was easy, ' +
        'what got in the way? Note what they say, think, do and feel.',
    }),
    step('empathy_map', {
      title: "A new member's empathy map",
      timeboxMin: 20,
      prompt:
        "Add your interview notes to your team's map of a new member on their first ride: " +
        'what they see, hear, say and do, think and feel.',
    }),
    step('break', { title: 'Morning break' }),
    step('insights', {
      title: 'What we learned',
      prompt: 'What surprised you about first rides? Write one thing you learned per note.',
    }),
    step('point_of_view', {
      title: 'Point of view',
      prompt: 'Finish the sentence: a new member needs [to do what] because [what we learned].',
    }),
    step('how_might_we', {
      title: 'How might we questions',
      prompt:
        'Turn a need into a question: How might we [do something] for a new member ' +
        'so that their first ride [goes how]?',
    }),
    step('lunch'),
    step('dot_vote', {
      title: 'Pick the challenges',
      prompt: 'Spend your three dots on the questions you most want to work on this afternoon.',
    }),
    step('team_sort', {
      title: 'Form the teams',
      prompt: 'Rank the three challenges, the one you most want first. Cairn will form even teams.',
    }),
    step('sketch', {
      title: 'Eight ideas in eight minutes',
      timeboxMin: 20,
      prompt:
        "Fold a sheet into eight. Sketch eight ways to help with your team's challenge, " +
        'one a minute, then photograph your sheet.',
    }),
    step('break', { title: 'Afternoon break' }),
    step('storyboard', {
      title: "Storyboard a new member's first ride",
      prompt:
        "Tell your team's idea as a story, frame by frame: the new member signs up, finds a bike, " +
        'rides, and comes back.',
    }),
    step('break', { title: 'Afternoon break' }),
    step('test_rounds', {
      title: 'Test rounds',
      timeboxMin: 25,
      prompt:
        "Visit the team on your screen and walk through their storyboard as a new member. " +
        "Note what worked, what didn't, your questions and your ideas.",
    }),
    step('closing', {
      title: 'Closing and next steps',
      timeboxMin: 10,
      prompt: 'Before you go: which idea should the co-op try first, and what will you do next?',
    }),
  ],
};

const HALF_DAY: AgendaTemplate = {
  id: 'half-day',
  name: 'Half day',
  description:
    'Doors 12:30–17:30, workshop 13:00–17:00: a packed afternoon from interviews to test rounds ' +
    'with two breaks, leaving some slack at the end.',
  window: { doorsOpen: '12:30', doorsClose: '17:30', start: '13:00', end: '17:00' },
  items: [
    step('welcome', {
      title: 'Welcome and plan for the afternoon',
      prompt:
        "Welcome! This afternoon we look at a new member's first ride with Harbour Lane Bike Co-op. " +
        'Here is the plan, and how we look after what you share.',
    }),
    step('icebreaker', {
      title: 'First bikes',
      timeboxMin: 10,
      settings: { rounds: 2, roundMinutes: 3 },
      prompt: 'Find your partner on your screen and tell each other about the first bike you remember riding.',
    }),
    step('interview', {
      title: 'Interviews: a first ride',
      prompt:
        'Ask your partner about a time they rode somewhere new for the first time. What was easy, ' +
        'what got in the way? Note what they say, think, do and feel.',
    }),
    step('insights', {
      title: 'What we learned',
      prompt: 'What surprised you about first rides? Write one thing you learned per note.',
    }),
    step('break'),
    step('how_might_we', {
      title: 'How might we questions',
      prompt:
        'Turn what you learned into a question: How might we [do something] for a new member ' +
        'so that their first ride [goes how]?',
    }),
    step('dot_vote', {
      title: 'Pick the challenges',
      prompt: 'Spend your three dots on the questions you most want to work on.',
    }),
    step('team_sort', {
      title: 'Form the teams',
      timeboxMin: 5,
      prompt: 'Rank the challenges, the one you most want first. Cairn will form even teams.',
    }),
    step('sketch', {
      title: 'Eight ideas in eight minutes',
      timeboxMin: 20,
      prompt:
        "Fold a sheet into eight. Sketch eight ways to help with your team's challenge, " +
        'one a minute, then photograph your sheet.',
    }),
    step('break'),
    step('storyboard', {
      title: "Storyboard a new member's first ride",
      timeboxMin: 25,
      prompt: "Tell your team's best idea as a story, frame by frame, from sign-up to the end of the ride.",
    }),
    step('test_rounds', {
      title: 'Test rounds',
      timeboxMin: 20,
      prompt:
        "Visit the team on your screen and walk through their storyboard as a new member. " +
        "Note what worked, what didn't, your questions and your ideas.",
    }),
    step('closing', {
      title: 'Closing and next steps',
      timeboxMin: 10,
      prompt: 'Before you go: which idea should the co-op try first, and what will you do next?',
    }),
  ],
};

/** Cairn's agenda templates, to start a plan from. */
export const TEMPLATES: readonly AgendaTemplate[] = [FULL_DAY, HALF_DAY];

/**
 * A fresh copy of a template's window and items, each item with a new id.
 * @example instantiateTemplate('half-day', () => crypto.randomUUID()).items.length // 13
 */
export function instantiateTemplate(
  id: TemplateId,
  makeId: () => string,
): { window: DayWindow; items: AgendaItem[] } {
  const template = TEMPLATES.find((t) => t.id === id);
  if (!template) throw new RangeError(`No template with id ${id}`);
  return {
    window: { ...template.window },
    items: template.items.map((item) => ({ ...structuredClone(item), id: makeId() })),
  };
}
