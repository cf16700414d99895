import { instantiateTemplate } from '../../shared/templates';
import type { AgendaItem } from '../../shared/schemas/agenda-item';
import type { DayWindow } from '../../shared/schemas/day-window';

// The demo's own titles and prompts, in the order of the full-day template's items (same types).
const DEMO_WORDING: { type: AgendaItem['type']; title: string; prompt: string }[] = [
  {
    type: 'welcome',
    title: 'Welcome and plan for the day',
    prompt:
      "Welcome! Today we look at a new member's first ride with Harbour Lane Bike Co-op. " +
      'Here is the plan, and how we look after what you share.',
  },
  {
    type: 'icebreaker',
    title: 'First bikes',
    prompt: 'Find your partner on your screen and tell each other about the first bike you remember riding.',
  },
  {
    type: 'interview',
    title: 'Interviews: a first ride',
    prompt:
      'Ask your partner about a time they rode somewhere new for the first time. What was easy, ' +
      'what got in the way? Note what they say, think, do and feel.',
  },
  {
    type: 'empathy_map',
    title: "A new member's empathy map",
    prompt:
      "Add your interview notes to your team's map of a new member on their first ride: " +
      'what they see, hear, say and do, think and feel.',
  },
  { type: 'break', title: 'Morning break', prompt: '' },
  {
    type: 'insights',
    title: 'What we learned',
    prompt: 'What surprised you about first rides? Write one thing you learned per note.',
  },
  {
    type: 'point_of_view',
    title: 'Point of view',
    prompt: 'Finish the sentence: a new member needs [to do what] because [what we learned].',
  },
  {
    type: 'how_might_we',
    title: 'How might we questions',
    prompt:
      'Turn a need into a question: How might we [do something] for a new member ' +
      'so that their first ride [goes how]?',
  },
  { type: 'lunch', title: '', prompt: '' },
  {
    type: 'dot_vote',
    title: 'Pick the challenges',
    prompt: 'Spend your {dots} dots on the questions you most want to work on this afternoon.',
  },
  {
    type: 'team_sort',
    title: 'Form the teams',
    prompt: 'Rank the three challenges, the one you most want first. Cairn will form even teams.',
  },
  { type: 'sketch', title: '', prompt: '' },
  { type: 'break', title: 'Afternoon break', prompt: '' },
  {
    type: 'storyboard',
    title: "Storyboard a new member's first ride",
    prompt:
      "Tell your team's idea as a story, frame by frame: the new member signs up, finds a bike, " +
      'rides, and comes back.',
  },
  { type: 'break', title: 'Afternoon break', prompt: '' },
  {
    type: 'test_rounds',
    title: 'Test rounds',
    prompt:
      'Visit the team on your screen and walk through their storyboard as a new member. ' +
      "Note what worked, what didn't, your questions and your ideas.",
  },
  {
    type: 'closing',
    title: 'Closing and next steps',
    prompt: 'Before you go: which idea should the co-op try first, and what will you do next?',
  },
];

/**
 * The demo workshop's day: the full-day template's timing in the Harbour Lane Bike Co-op's own words
 * (an empty title or prompt keeps the template's).
 */
export function demoAgenda(makeId: () => string): { window: DayWindow; items: AgendaItem[] } {
  const { window, items } = instantiateTemplate('full-day', makeId);
  if (items.length !== DEMO_WORDING.length) throw new Error('The demo wording no longer matches the full-day template');
  return {
    window,
    items: items.map((item, i) => {
      const words = DEMO_WORDING[i]!;
      if (words.type !== item.type) throw new Error(`Demo item ${i + 1} is a ${words.type}, the template's a ${item.type}`);
      return { ...item, title: words.title || item.title, prompt: words.prompt || item.prompt };
    }),
  };
}
