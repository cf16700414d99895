import type { ActivitySettings, ActivityType, AgendaItem, Criterion, Phase } from './schemas/agenda-item';
import type { SubmissionInput } from './schemas/live';
import { atLeast } from './numbers';
import type { MessageTable } from './wording';
import { CLOSING_PARTS, EMPATHY_MAP_PARTS, FEEDBACK_GRID_PARTS, INTERVIEW_PARTS, PAINS_AND_GAINS_PARTS, type NotePart } from './notes';

/** The kinds of vote Cairn runs; each is the activity type of the same name (the library's `vote` trait). */
export const VOTE_KINDS = ['dot_vote', 'preference_vote', 'team_sort'] as const satisfies readonly ActivityType[];
/** A kind of vote, e.g. `'dot_vote'`. */
export type VoteKindName = (typeof VOTE_KINDS)[number];

/** Everything Cairn can put on a packing list, in the list's order (plain data, no zod: the phone's code imports this file). */
export const MATERIAL_KEYS = [
  'sticky_notes',
  'markers',
  'paper_a4',
  'paper_a3',
  'dot_stickers',
  'tape',
  'whiteboard',
  'projector',
  'tablet',
  'timer',
  'snacks',
  'water',
] as const;
/** A material's key, e.g. `'dot_stickers'`. */
export type MaterialKey = (typeof MATERIAL_KEYS)[number];

/** How a material adds up over the agenda. */
export interface MaterialDefinition {
  /**
   * Used up by each activity (sticky notes, paper, snacks): the quantities of the items are added.
   * Otherwise the thing is picked up again for the next activity (markers, tape, a projector):
   * the packing list takes the largest quantity any one item asks for.
   */
  consumable: boolean;
}

/** How each material adds up over the agenda (its name and unit are the catalogs': `material.<key>.name`, `.amount`). */
export const MATERIALS: Record<MaterialKey, MaterialDefinition> = {
  sticky_notes: { consumable: true },
  markers: { consumable: false },
  paper_a4: { consumable: true },
  paper_a3: { consumable: true },
  dot_stickers: { consumable: true },
  tape: { consumable: false },
  whiteboard: { consumable: false },
  projector: { consumable: false },
  tablet: { consumable: false },
  timer: { consumable: false },
  snacks: { consumable: true },
  water: { consumable: true },
};

/**
 * Why an item needs as many of a material as it does, in Cairn's own words: the packing list says
 * `packingWhy.<why>` from the facilitator catalogs, with the rule's quantity as `n` where the words name it.
 * The origins of the numbers stay in the rules' `source`.
 */
export const MATERIAL_WHYS = {
  screen_room: {}, tablet: {}, timer_rounds: {}, sheet_interview: {}, marker_each: {}, canvas_team_map: {},
  notes_team_map: { n: 'number' }, tape_team_map: {}, notes_insights: { n: 'number' }, wall: {}, drafts: {},
  questions: { n: 'number' }, dots_spare: {}, sketch_sheets: {}, storyboard_sheets: {}, storyboard_notes: {},
  tape_team: {}, grid_sheet: {}, grid_notes: {}, snack_break: {}, water_break: {}, snack_lunch: {}, water_lunch: {},
  reflections: {},
} as const satisfies MessageTable;
/** A reason for a quantity, e.g. `'dots_spare'`. */
export type MaterialWhy = keyof typeof MATERIAL_WHYS;

/**
 * What one agenda item needs of one material.
 * - `person`: `quantity` for each participant;
 * - `team`: `quantity` for each team;
 * - `voter_dot`: `quantity` dot stickers for each dot a voter spends (dots per voter × criteria ×
 *   headcount), so 1.5 means 50 % spare;
 * - `fixed`: `quantity` once for the whole workshop.
 */
export interface MaterialRule {
  item: MaterialKey;
  per: 'person' | 'team' | 'voter_dot' | 'fixed';
  quantity: number;
  /** Where the quantity comes from: a published guide, or "common practice". For code and tests, never shown. */
  source: string;
  /** Why this many, in Cairn's own words: the packing list says `packingWhy.<why>` ("every voter’s dots and half again spare"). */
  why: MaterialWhy;
  /** The rule applies only when this setting of the item is true (snacks and water at a break). */
  onlyIfSetting?: 'snacks';
}

/** One activity type: its default title, default phase and timebox, prompt, settings and materials. */
export interface ActivityDefinition {
  type: ActivityType;
  /** The title a new item of the type starts with, in English (the screens name the type from the catalogs: `activityType.<type>.name`). */
  label: string;
  phase: Phase;
  defaultTimeboxMin: number;
  /** The shortest Cairn suggests cutting the item to: about two thirds of the default. */
  minTimeboxMin: number;
  defaultPrompt: string;
  defaultSettings: ActivitySettings;
  /** Pure talk, not an activity: the talk-length rule applies. */
  talkOnly: boolean;
  /** A break or lunch: resets the stretch rule, never shortened, outside the phase order. */
  isBreak: boolean;
  /** Asks people to move about the room. */
  movement: boolean;
  /** The kinds of note phones may send to it; none for a talk, a break or a vote (votes go as ballots). */
  noteKinds: readonly SubmissionInput['kind'][];
  // The live traits: what the server, the console, the projector and the phone do differently for the type.
  /** Participants meet in rotating pairs drawn by round-robin (the icebreaker and the interview share the pairing). */
  paired: boolean;
  /** It runs in rounds the facilitator moves through: rotating pairs, or the test rounds' visits. */
  rounds: boolean;
  /** Its notes belong to a team: the console sets teams up for it and a phone shows its team. */
  teamBoard: boolean;
  /** Teammates' phones share one board: a note goes to the team's room the moment it comes. */
  liveTeamRoom: boolean;
  /** The kind of note a photo becomes when phones take photos for it; `null` when it takes none. */
  photos: 'sketch' | 'frame' | null;
  /** Its notes stream to the console to moderate (hide, merge, themes, promote) and to the projector; true exactly when it takes notes. */
  moderated: boolean;
  /** The vote it runs, so its screens are the voting ones and phones send ballots; `null` for every other activity. */
  vote: VoteKindName | null;
  /** The parts its notes are filed under; empty when its notes stand alone. */
  noteParts: readonly NotePart[];
  /** Parts added to `noteParts` while a setting of the item is on (the empathy map's pains and gains). */
  extraParts: { setting: 'painsAndGains'; parts: readonly NotePart[] } | null;
  materials: MaterialRule[];
}

/** The usual pair of dot-vote criteria, for the planner to add (common practice: impact / effort matrix). */
export const IMPACT_EFFORT_CRITERIA: readonly Criterion[] = [
  { id: 'impact', label: 'Impact', hint: 'a dot for each idea that would make the biggest difference', dotMeans: 'high' },
  // A dot on effort marks an easy idea, so dots count towards "low effort" (the matrix ranks high impact, low effort first).
  { id: 'effort', label: 'Effort', hint: 'a dot for each idea that would be easy to do', dotMeans: 'low' },
];

/** The shortest cut of a timebox Cairn suggests: two thirds of it, rounded (common practice); refuses a timebox that is not a finite number of 0 or more. */
export function defaultMinTimebox(timeboxMin: number): number {
  atLeast('The timebox', timeboxMin, 0);
  return Math.max(1, Math.round((timeboxMin * 2) / 3));
}

// Why each quantity is what it is, in Cairn's own words (the origins of the numbers are in the comments).
const PRACTICE = 'common practice';
const SPARE_DOTS = 'a published facilitation guide; common practice: dots per voter × voters, plus 50 % spare';
const DOTS_PER_VOTER =
  'published guides (Global Learning Partners, "Dot-mocracy"; Dotmocracy handbook): 3–5 dots per voter is common';
const STORYBOARD_STEPS = 'common practice; published method cards: a storyboard runs 10–20 steps';
const QUICK_SKETCHES = 'common practice: quick sketches, about a minute each, one idea a box';
const FEEDBACK_GRID = 'common practice; a published method card: a feedback grid of four parts';

const marker: MaterialRule = {
  item: 'markers',
  per: 'person',
  quantity: 1,
  source: PRACTICE, why: 'marker_each',
};
const screen: MaterialRule = {
  item: 'projector',
  per: 'fixed',
  quantity: 1,
  source: PRACTICE, why: 'screen_room',
};
const facilitatorTablet: MaterialRule = {
  item: 'tablet',
  per: 'fixed',
  quantity: 1,
  source: PRACTICE, why: 'tablet',
};
const wall: MaterialRule = {
  item: 'whiteboard',
  per: 'fixed',
  quantity: 1,
  source: PRACTICE, why: 'wall',
};
const refreshments = (snackWhy: MaterialWhy, waterWhy: MaterialWhy): MaterialRule[] => [
  { item: 'snacks', per: 'person', quantity: 1, source: PRACTICE, why: snackWhy, onlyIfSetting: 'snacks' },
  { item: 'water', per: 'person', quantity: 1, source: PRACTICE, why: waterWhy, onlyIfSetting: 'snacks' },
];

/** The fields an activity may leave out, taking the usual value (no notes, no pairs, no rounds, …). */
type Defaulted =
  | 'minTimeboxMin' | 'talkOnly' | 'isBreak' | 'movement' | 'noteKinds' | 'paired' | 'rounds' | 'teamBoard'
  | 'liveTeamRoom' | 'photos' | 'moderated' | 'vote' | 'noteParts' | 'extraParts';

function activity(def: Omit<ActivityDefinition, Defaulted> & Partial<Pick<ActivityDefinition, Defaulted>>): ActivityDefinition {
  const noteKinds = def.noteKinds ?? [];
  return {
    talkOnly: false,
    isBreak: false,
    movement: false,
    noteKinds,
    paired: false,
    rounds: false,
    teamBoard: false,
    liveTeamRoom: false,
    photos: null,
    // An activity that takes notes streams them to the console for moderation; the icebreaker only shows pairs.
    moderated: noteKinds.length > 0,
    vote: null,
    noteParts: [],
    extraParts: null,
    minTimeboxMin: defaultMinTimebox(def.defaultTimeboxMin),
    ...def,
  };
}

/** Every activity type Cairn offers, with the defaults a new agenda item starts from. */
export const ACTIVITY_LIBRARY: Record<ActivityType, ActivityDefinition> = {
  welcome: activity({
    type: 'welcome',
    label: 'Welcome',
    phase: 'opening',
    defaultTimeboxMin: 10,
    defaultPrompt: 'Welcome! Here is the plan for today and how we look after what you share.',
    defaultSettings: {},
    talkOnly: true,
    materials: [screen, facilitatorTablet],
  }),
  icebreaker: activity({
    type: 'icebreaker',
    paired: true,
    rounds: true,
    label: 'Icebreaker',
    phase: 'opening',
    defaultTimeboxMin: 15,
    defaultPrompt:
      'Find your partner on your screen and tell each other ' +
      'one thing you did for the first time this year.',
    defaultSettings: { rounds: 3, roundMinutes: 3, movement: true },
    movement: true,
    materials: [
      { item: 'timer', per: 'fixed', quantity: 1, source: PRACTICE, why: 'timer_rounds' },
    ],
  }),
  interview: activity({
    type: 'interview',
    paired: true,
    rounds: true,
    noteParts: INTERVIEW_PARTS,
    noteKinds: ['note'],
    label: 'Interview',
    phase: 'empathize',
    defaultTimeboxMin: 25,
    defaultPrompt:
      'Ask your partner about a recent time they tried something new. ' +
      'Note what they say, think, do and feel.',
    // Two turns, so each partner asks once and answers once; ten minutes a turn leaves time to listen,
    // ask why and note what was heard (common practice).
    defaultSettings: { rounds: 2, roundMinutes: 10 },
    materials: [
      { item: 'paper_a4', per: 'person', quantity: 1, source: PRACTICE, why: 'sheet_interview' },
      marker,
      { item: 'timer', per: 'fixed', quantity: 1, source: PRACTICE, why: 'timer_rounds' },
    ],
  }),
  empathy_map: activity({
    type: 'empathy_map',
    teamBoard: true,
    liveTeamRoom: true,
    noteParts: EMPATHY_MAP_PARTS,
    extraParts: { setting: 'painsAndGains', parts: PAINS_AND_GAINS_PARTS },
    noteKinds: ['note'],
    label: 'Empathy map',
    phase: 'empathize',
    defaultTimeboxMin: 25,
    defaultPrompt: 'Add what you heard to your team’s map: what they see, hear, say and do, think and feel.',
    defaultSettings: { painsAndGains: false },
    materials: [
      { item: 'paper_a3', per: 'team', quantity: 1, source: PRACTICE, why: 'canvas_team_map' },
      { item: 'sticky_notes', per: 'person', quantity: 15, source: PRACTICE, why: 'notes_team_map' },
      { item: 'tape', per: 'team', quantity: 1, source: PRACTICE, why: 'tape_team_map' },
      marker,
    ],
  }),
  insights: activity({
    type: 'insights',
    noteKinds: ['note'],
    label: 'Insights',
    phase: 'define',
    defaultTimeboxMin: 15,
    defaultPrompt: 'What surprised you? Write one thing you learned per note.',
    defaultSettings: {},
    materials: [
      {
        item: 'sticky_notes',
        per: 'person',
        quantity: 10,
        source: PRACTICE, why: 'notes_insights',
      },
      marker,
      wall,
    ],
  }),
  point_of_view: activity({
    type: 'point_of_view',
    noteKinds: ['point_of_view'],
    label: 'Point of view',
    phase: 'define',
    defaultTimeboxMin: 10,
    defaultPrompt: 'Finish the sentence: [who] needs [to do what] because [what we learned].',
    defaultSettings: {},
    materials: [
      { item: 'sticky_notes', per: 'person', quantity: 3, source: PRACTICE, why: 'drafts' },
    ],
  }),
  how_might_we: activity({
    type: 'how_might_we',
    noteKinds: ['how_might_we'],
    label: 'How might we',
    phase: 'define',
    defaultTimeboxMin: 15,
    defaultPrompt: 'Turn a need into a question: How might we [do something] for [whom] so that [outcome]?',
    defaultSettings: {},
    materials: [
      { item: 'sticky_notes', per: 'person', quantity: 5, source: PRACTICE, why: 'questions' },
      wall,
    ],
  }),
  dot_vote: activity({
    type: 'dot_vote',
    vote: 'dot_vote',
    label: 'Dot vote',
    phase: 'ideate',
    defaultTimeboxMin: 10,
    defaultPrompt: 'Spend your dots on the questions you most want to work on.',
    // Criteria are optional: none means one overall vote; IMPACT_EFFORT_CRITERIA is the usual pair.
    defaultSettings: { dotsPerVoter: 3, topN: 3 },
    materials: [
      { item: 'dot_stickers', per: 'voter_dot', quantity: 1.5, source: `${SPARE_DOTS}; ${DOTS_PER_VOTER}`, why: 'dots_spare' },
      wall,
      screen,
    ],
  }),
  preference_vote: activity({
    type: 'preference_vote',
    vote: 'preference_vote',
    label: 'Preference vote',
    phase: 'ideate',
    defaultTimeboxMin: 10,
    defaultPrompt: 'Put the options in the order you prefer them, favourite first.',
    defaultSettings: { topN: 3 },
    materials: [screen],
  }),
  team_sort: activity({
    type: 'team_sort',
    vote: 'team_sort',
    label: 'Team sort',
    phase: 'ideate',
    defaultTimeboxMin: 10,
    defaultPrompt: 'Rank the challenges you would most like to work on. Cairn will form even teams.',
    defaultSettings: { teamCount: 3 },
    materials: [screen],
  }),
  sketch: activity({
    type: 'sketch',
    teamBoard: true,
    photos: 'sketch',
    noteKinds: ['sketch', 'feedback'],
    label: 'Quick sketches',
    phase: 'ideate',
    defaultTimeboxMin: 25,
    defaultPrompt: 'Draw {sketches} rough sketches of different ideas, one idea a box, then photograph your sheet.',
    // The number of sketches is a setting of the item; its prompt names it through {sketches}.
    defaultSettings: { sketchesPerPerson: 6 },
    materials: [
      {
        item: 'paper_a4',
        per: 'person',
        quantity: 2,
        source: QUICK_SKETCHES,
        why: 'sketch_sheets',
      },
      marker,
    ],
  }),
  storyboard: activity({
    type: 'storyboard',
    teamBoard: true,
    liveTeamRoom: true,
    photos: 'frame',
    noteKinds: ['frame'],
    label: 'Storyboard',
    phase: 'prototype',
    defaultTimeboxMin: 30,
    defaultPrompt: 'Tell the idea as a story, frame by frame: who they are, what happens, how it ends.',
    defaultSettings: { storyboardFrames: 12 },
    materials: [
      { item: 'paper_a3', per: 'team', quantity: 2, source: PRACTICE, why: 'storyboard_sheets' },
      { item: 'sticky_notes', per: 'team', quantity: 20, source: STORYBOARD_STEPS, why: 'storyboard_notes' },
      { item: 'tape', per: 'team', quantity: 1, source: PRACTICE, why: 'tape_team' },
      marker,
    ],
  }),
  test_rounds: activity({
    type: 'test_rounds',
    rounds: true,
    teamBoard: true,
    noteParts: FEEDBACK_GRID_PARTS,
    noteKinds: ['feedback'],
    label: 'Test rounds',
    phase: 'test',
    defaultTimeboxMin: 30,
    defaultPrompt:
      'Visit the team on your screen, try their idea, ' +
      'and note what worked, what did not, your questions and your ideas.',
    defaultSettings: { rounds: 2 },
    materials: [
      {
        item: 'paper_a3',
        per: 'team',
        quantity: 1,
        source: FEEDBACK_GRID,
        why: 'grid_sheet',
      },
      {
        item: 'sticky_notes',
        per: 'person',
        quantity: 8,
        source: PRACTICE, why: 'grid_notes',
      },
      { item: 'timer', per: 'fixed', quantity: 1, source: PRACTICE, why: 'timer_rounds' },
    ],
  }),
  break: activity({
    type: 'break',
    label: 'Break',
    phase: 'break',
    defaultTimeboxMin: 15,
    // Breaks are never cut (published workshop-planning guides: 15 min breaks): the shortest is the default.
    minTimeboxMin: 15,
    defaultPrompt: 'Time for a break. Stretch, have a drink, and be back when the countdown ends.',
    defaultSettings: { snacks: true },
    isBreak: true,
    materials: refreshments(
      'snack_break',
      'water_break',
    ),
  }),
  lunch: activity({
    type: 'lunch',
    label: 'Lunch',
    phase: 'break',
    defaultTimeboxMin: 45,
    // Published workshop-planning guides: lunch at least 45 min on a full day; never cut below it.
    minTimeboxMin: 45,
    defaultPrompt: 'Lunch! Step away from the work for a while. We start again when the countdown ends.',
    defaultSettings: { snacks: true },
    isBreak: true,
    materials: refreshments(
      'snack_lunch',
      'water_lunch',
    ),
  }),
  talk: activity({
    type: 'talk',
    label: 'Talk',
    phase: 'opening',
    defaultTimeboxMin: 15,
    defaultPrompt: 'Listen in: a short talk to set up what comes next.',
    defaultSettings: {},
    talkOnly: true,
    materials: [screen],
  }),
  closing: activity({
    type: 'closing',
    noteParts: CLOSING_PARTS,
    noteKinds: ['reflection'],
    label: 'Closing',
    phase: 'closing',
    defaultTimeboxMin: 15,
    defaultPrompt: 'Before you go: what will you take away from today, and what should happen next?',
    defaultSettings: {},
    materials: [
      { item: 'sticky_notes', per: 'person', quantity: 3, source: PRACTICE, why: 'reflections' },
      screen,
    ],
  }),
};

/** The activity types of which a trait holds, in the library's order. */
function typesWhere(holds: (def: ActivityDefinition) => boolean): ReadonlySet<ActivityType> {
  return new Set(Object.values(ACTIVITY_LIBRARY).filter(holds).map((d) => d.type));
}

/** Activities whose pairs rotate by round-robin (the library's `paired`). */
export const PAIRED_TYPES = typesWhere((d) => d.paired);
/** Activities that run in rounds (the library's `rounds`). */
export const ROUND_TYPES = typesWhere((d) => d.rounds);
/** Activities whose notes belong to a team (the library's `teamBoard`). */
export const TEAM_TYPES = typesWhere((d) => d.teamBoard);
/** Activities whose teammates share a board as notes come (the library's `liveTeamRoom`). */
export const LIVE_TEAM_TYPES = typesWhere((d) => d.liveTeamRoom);
/** Activities whose phones take photos (the library's `photos`). */
export const PHOTO_TYPES = typesWhere((d) => d.photos !== null);
/** Activities whose notes are moderated on the console and shown on the projector (the library's `moderated`). */
export const MODERATED_TYPES = typesWhere((d) => d.moderated);
/** Activities that run a vote, whose screens are the voting ones (the library's `vote`). */
export const VOTE_TYPES = typesWhere((d) => d.vote !== null);

/**
 * Whether an activity type runs a vote; narrows the type to its vote kind.
 * @example isVoteType('team_sort') // true
 */
export function isVoteType(type: string): type is VoteKindName {
  return (ACTIVITY_LIBRARY as Record<string, ActivityDefinition | undefined>)[type]?.vote != null;
}

/**
 * The parts an activity's notes are filed under (with the extra parts its settings turn on); empty for
 * activities whose notes stand alone.
 * @example notePartsFor('empathy_map', { painsAndGains: true }).length // 6
 */
export function notePartsFor(type: ActivityType, settings: ActivitySettings): readonly NotePart[] {
  const def = ACTIVITY_LIBRARY[type];
  const extra = def.extraParts;
  return extra && settings[extra.setting] ? [...def.noteParts, ...extra.parts] : def.noteParts;
}

/**
 * Why a phone's note of a kind cannot go to an activity of a type, or `null` when it can: a talk, a
 * break or a vote takes no notes, and each other activity only its own kinds.
 * @example noteRefusal('break', 'note') // 'note_not_taken' (a reason of shared/reasons.ts)
 */
export function noteRefusal(type: ActivityType, kind: SubmissionInput['kind']): 'note_not_taken' | 'note_other_kind' | null {
  const kinds = ACTIVITY_LIBRARY[type].noteKinds;
  if (kinds.includes(kind)) return null;
  return kinds.length === 0 ? 'note_not_taken' : 'note_other_kind';
}

/**
 * Whether an agenda item is a break (a break or lunch, or any item placed in the break phase).
 * @example isBreakItem({ type: 'lunch', ... }) // true
 */
export function isBreakItem(item: Pick<AgendaItem, 'type' | 'phase'>): boolean {
  return item.phase === 'break' || ACTIVITY_LIBRARY[item.type].isBreak;
}

/**
 * A new agenda item of a type, filled in from the library's defaults.
 * @example newAgendaItem('dot_vote', 'a1').settings.dotsPerVoter // 3
 */
export function newAgendaItem(type: ActivityType, id: string): AgendaItem {
  const def = ACTIVITY_LIBRARY[type];
  return {
    id,
    type,
    phase: def.phase,
    title: def.label,
    timeboxMin: def.defaultTimeboxMin,
    minTimeboxMin: def.minTimeboxMin,
    prompt: def.defaultPrompt,
    settings: structuredClone(def.defaultSettings),
  };
}

// Phases in the order a day runs them; breaks sit outside the order.
const DAY_ORDER: readonly Phase[] = ['opening', 'empathize', 'define', 'ideate', 'prototype', 'test', 'closing'];

/**
 * Where a new item of a phase belongs in an agenda: right after the last activity of the same or an
 * earlier phase (so a new ideate item never lands after Closing); a break or lunch goes before the
 * closing items. Keeps the phase-order rule (computeSchedule) true for an agenda that already keeps it.
 * @example insertionIndex([{ type: 'welcome', phase: 'opening' }, { type: 'closing', phase: 'closing' }], 'ideate') // 1
 */
export function insertionIndex(agenda: Pick<AgendaItem, 'type' | 'phase'>[], phase: Phase): number {
  if (phase === 'break') {
    const closing = agenda.findIndex((i) => !isBreakItem(i) && i.phase === 'closing');
    return closing < 0 ? agenda.length : closing;
  }
  const rank = DAY_ORDER.indexOf(phase);
  let at = 0;
  agenda.forEach((item, i) => {
    if (!isBreakItem(item) && DAY_ORDER.indexOf(item.phase) <= rank) at = i + 1;
  });
  return at;
}

/**
 * The title of a copy, told apart from the original and from earlier copies: "Title (copy)", then
 * "Title (copy 2)", …, shortened to fit the 120-character limit of a title.
 * @example copyTitle('Sketch', ['Sketch', 'Sketch (copy)']) // 'Sketch (copy 2)'
 */
export function copyTitle(title: string, taken: readonly string[]): string {
  const base = title.replace(/ \(copy(?: \d+)?\)$/, '');
  const used = new Set(taken);
  for (let n = 1; ; n++) {
    const suffix = n === 1 ? ' (copy)' : ` (copy ${n})`;
    const candidate = base.slice(0, 120 - suffix.length).trimEnd() + suffix;
    if (!used.has(candidate)) return candidate;
  }
}

/**
 * The key a storyboard is kept under: its team's id, or `p:` and its author's id when the author had
 * no team (frame orders, the console's stories and a phone's own story all use it).
 * @example storyKey({ teamId: null, participantId: 'x1' }) // 'p:x1'
 */
export function storyKey(frame: { teamId: string | null; participantId: string }): string {
  return frame.teamId ?? `p:${frame.participantId}`;
}

/** Whose storyboard a key names: a team's, or one participant's own. */
export function storyOwner(key: string): { teamId: string } | { participantId: string } {
  return key.startsWith('p:') ? { participantId: key.slice(2) } : { teamId: key };
}
