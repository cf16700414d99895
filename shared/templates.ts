import { ACTIVITY_LIBRARY, defaultMinTimebox } from './activities';
import { fillDots, fillSketches } from './words';
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
  pinnedAt?: string;
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
    ...(overrides.pinnedAt ? { pinnedAt: overrides.pinnedAt } : {}),
  };
}

// Both templates speak in neutral words: "{topic}" and "{people}" are filled from the brief when a
// workshop is made (fillTemplateText), "{dots}" from the vote's own budget and "{sketches}" from the
// sketching item's setting whenever the prompt is shown
// (showPrompt), so a prompt never names a number the facilitator has since changed.
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
      prompt: 'Welcome! Today we work on “{topic}”. Here is the plan, and how we look after what you share.',
    }),
    step('icebreaker', {
      title: 'Warm-up pairs',
      timeboxMin: 10,
      settings: { rounds: 2, roundMinutes: 3 },
      prompt: 'Find your partner on your screen and tell each other about something you learned to do recently.',
    }),
    step('interview', {
      title: 'Interviews',
      prompt:
        'Ask your partner about a recent experience close to “{topic}”. What was easy, ' +
        'what got in the way? Note what they say, think, do and feel.',
    }),
    step('empathy_map', {
      title: 'Empathy map',
      timeboxMin: 20,
      prompt:
        "Add your interview notes to your team's map of {people}: " +
        'what they see, hear, say and do, think and feel.',
    }),
    step('break', { title: 'Morning break' }),
    step('insights', {
      title: 'What we learned',
      prompt: 'What surprised you in the interviews? Write one thing you learned per note.',
    }),
    step('point_of_view', {
      title: 'Point of view',
      prompt: 'Finish the sentence about {people}: [who] needs [to do what] because [what we learned].',
    }),
    step('how_might_we', {
      title: 'How might we questions',
      prompt: 'Turn a need into a question: How might we [do something] for {people} so that [outcome]?',
    }),
    step('lunch', { pinnedAt: '12:00' }),
    step('dot_vote', {
      title: 'Pick the challenges',
      prompt: 'Spend your {dots} dots on the questions you most want to work on.',
    }),
    step('team_sort', {
      title: 'Form the teams',
      prompt: 'Rank the challenges, the one you most want first. Cairn will form even teams.',
    }),
    step('sketch', {
      title: 'Quick sketches',
      timeboxMin: 20,
      prompt:
        "Draw {sketches} rough sketches of ways to help with your team's challenge, one idea a box, " +
        'then photograph your sheet.',
    }),
    step('break', { title: 'Afternoon break' }),
    step('storyboard', {
      title: 'Storyboard the idea',
      prompt:
        "Tell your team's idea as a story, frame by frame, through the eyes of {people}: " +
        'how it starts, what happens, how it ends.',
    }),
    step('break', { title: 'Afternoon break' }),
    step('test_rounds', {
      title: 'Test rounds',
      timeboxMin: 25,
      prompt:
        'Visit the team on your screen and walk through their storyboard as {people} would. ' +
        "Note what worked, what didn't, your questions and your ideas.",
    }),
    step('closing', {
      title: 'Closing and next steps',
      timeboxMin: 10,
      prompt: 'Before you go: which idea should we try first, and what will you do next?',
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
      prompt: 'Welcome! This afternoon we work on “{topic}”. Here is the plan, and how we look after what you share.',
    }),
    step('icebreaker', {
      title: 'Warm-up pairs',
      timeboxMin: 10,
      settings: { rounds: 2, roundMinutes: 3 },
      prompt: 'Find your partner on your screen and tell each other about something you learned to do recently.',
    }),
    step('interview', {
      title: 'Interviews',
      prompt:
        'Ask your partner about a recent experience close to “{topic}”. What was easy, ' +
        'what got in the way? Note what they say, think, do and feel.',
    }),
    step('insights', {
      title: 'What we learned',
      prompt: 'What surprised you in the interviews? Write one thing you learned per note.',
    }),
    step('break'),
    step('how_might_we', {
      title: 'How might we questions',
      prompt: 'Turn what you learned into a question: How might we [do something] for {people} so that [outcome]?',
    }),
    step('dot_vote', {
      title: 'Pick the challenges',
      prompt: 'Spend your {dots} dots on the questions you most want to work on.',
    }),
    step('team_sort', {
      title: 'Form the teams',
      timeboxMin: 5,
      prompt: 'Rank the challenges, the one you most want first. Cairn will form even teams.',
    }),
    step('sketch', {
      title: 'Quick sketches',
      timeboxMin: 20,
      prompt:
        "Draw {sketches} rough sketches of ways to help with your team's challenge, one idea a box, " +
        'then photograph your sheet.',
    }),
    step('break'),
    step('storyboard', {
      title: 'Storyboard the idea',
      timeboxMin: 25,
      prompt: "Tell your team's best idea as a story, frame by frame, through the eyes of {people}.",
    }),
    step('test_rounds', {
      title: 'Test rounds',
      timeboxMin: 20,
      prompt:
        'Visit the team on your screen and walk through their storyboard as {people} would. ' +
        "Note what worked, what didn't, your questions and your ideas.",
    }),
    step('closing', {
      title: 'Closing and next steps',
      timeboxMin: 10,
      prompt: 'Before you go: which idea should we try first, and what will you do next?',
    }),
  ],
};

/** Cairn's agenda templates, to start a plan from. */
export const TEMPLATES: readonly AgendaTemplate[] = [FULL_DAY, HALF_DAY];

/** What a template's placeholders are filled with: the brief's topic and the people it is for. */
export interface TemplateFill {
  topic: string;
  people: string;
}

/** The words "{people}" takes when the brief names no short persona. */
export const DEFAULT_PEOPLE = 'the people we design for';

// A persona longer than this reads badly inside a sentence; the prompt then says DEFAULT_PEOPLE.
const MAX_PEOPLE_CHARS = 60;

/**
 * The fill of a template from a brief: its title as the topic, and the persona's first sentence as
 * the people when that is short (a long description would not fit inside a prompt).
 * @example templateFill({ title: 'Borrowing a book', persona: 'First-time library visitors' }).people // 'First-time library visitors'
 */
export function templateFill(brief: { title: string; persona?: string | null }): TemplateFill {
  const first = (brief.persona ?? '').trim().split(/[.;!?\n]/)[0]!.trim();
  const fits = first.length > 0 && first.length <= MAX_PEOPLE_CHARS;
  return { topic: brief.title.trim(), people: fits ? first : DEFAULT_PEOPLE };
}

/**
 * A template's text with "{topic}" and "{people}" filled in; "{dots}" stays for showPrompt.
 * @example fillTemplateText('Map of {people}', { topic: 'x', people: 'new visitors' }) // 'Map of new visitors'
 */
export function fillTemplateText(text: string, fill: TemplateFill): string {
  return text.replaceAll('{topic}', fill.topic).replaceAll('{people}', fill.people);
}

/**
 * The prompt as every screen shows it: a dot vote's count of dots ("{dots}", "three dots") follows the
 * vote's budget where given, else the item's; a sketching item's "{sketches}" its number of sketches.
 * @example showPrompt({ type: 'dot_vote', prompt: 'Spend your {dots} dots', settings: { dotsPerVoter: 5 } }) // 'Spend your 5 dots'
 */
export function showPrompt(item: Pick<AgendaItem, 'type' | 'prompt' | 'settings'>, voteDots?: number | null): string {
  if (item.type === 'sketch') {
    return fillSketches(item.prompt, item.settings.sketchesPerPerson ?? ACTIVITY_LIBRARY.sketch.defaultSettings.sketchesPerPerson);
  }
  if (item.type !== 'dot_vote') return item.prompt;
  // The vote's own budget, once it was set up, wins over the plan's (as the live screens show it).
  return fillDots(item.prompt, voteDots ?? item.settings.dotsPerVoter ?? ACTIVITY_LIBRARY.dot_vote.defaultSettings.dotsPerVoter);
}

/**
 * A fresh copy of a template's window and items, each item with a new id, its titles and prompts
 * filled from the brief.
 * @example instantiateTemplate('half-day', () => crypto.randomUUID()).items.length // 13
 */
export function instantiateTemplate(
  id: TemplateId,
  makeId: () => string,
  fill: TemplateFill = { topic: 'this workshop', people: DEFAULT_PEOPLE },
): { window: DayWindow; items: AgendaItem[] } {
  const template = TEMPLATES.find((t) => t.id === id);
  if (!template) throw new RangeError(`No template with id ${id}`);
  return {
    window: { ...template.window },
    items: template.items.map((item) => ({
      ...structuredClone(item),
      id: makeId(),
      title: fillTemplateText(item.title, fill),
      prompt: fillTemplateText(item.prompt, fill),
    })),
  };
}
