/**
 * What phones send in activities: the parts a note is filed under, the guided sentences, the limits.
 * Plain data and functions without the schema library, so a phone's page does not download it; the
 * schemas built on these live in shared/schemas/activities.ts, which re-exports this file.
 */
import type { ActivitySettings, ActivityType } from './schemas/agenda-item';
import type { TextRule } from './text';

/** What a note's text must be: the server's `SubmissionInput` and the phone's check before it queues a note read this. */
export const NOTE_TEXT: TextRule = { required: 'Write something first', max: 500, tooLong: 'Keep a note under 500 characters', multiline: true };

/** One part a note can be filed under: a quadrant of an interview or empathy map, a part of the feedback capture grid. */
export interface NotePart {
  id: string;
  label: string;
  /** A short prompt shown under the part's button on the phone. */
  hint: string;
}

/** What an interviewer notes about their partner (published empathy-map canvases: says / thinks / does / feels). */
export const INTERVIEW_PARTS: readonly NotePart[] = [
  { id: 'says', label: 'Says', hint: 'Words they used' },
  { id: 'thinks', label: 'Thinks', hint: 'What they seem to believe' },
  { id: 'does', label: 'Does', hint: 'What they did' },
  { id: 'feels', label: 'Feels', hint: 'What they felt' },
];

/** The quadrants of a team's empathy map (the sees / hears variant of the published canvases). */
export const EMPATHY_MAP_PARTS: readonly NotePart[] = [
  { id: 'sees', label: 'Sees', hint: 'What they notice around them' },
  { id: 'hears', label: 'Hears', hint: 'What others tell them' },
  { id: 'says_does', label: 'Says & does', hint: 'Out loud, in the open' },
  { id: 'thinks_feels', label: 'Thinks & feels', hint: 'Worries and hopes' },
];

/** The extra quadrants of an empathy map whose item sets `painsAndGains`. */
export const PAINS_AND_GAINS_PARTS: readonly NotePart[] = [
  { id: 'pains', label: 'Pains', hint: 'What gets in their way or worries them' },
  { id: 'gains', label: 'Gains', hint: 'What would make it worth it for them' },
];

/** The four parts of the feedback grid, in Cairn's plain words (after a published method card's four parts). */
export const FEEDBACK_GRID_PARTS: readonly NotePart[] = [
  { id: 'worked', label: 'What worked', hint: 'What the tester liked' },
  { id: 'didnt_work', label: "What didn't work", hint: 'What to change' },
  { id: 'questions', label: 'Questions', hint: 'What left them wondering' },
  { id: 'ideas', label: 'Ideas', hint: 'What it sparked' },
];

/**
 * A tester's feedback of one round of test rounds (0-based, as the phone files it in `fields.round`;
 * feedback without a round counts as the first): each round starts a fresh grid.
 * @example feedbackOfRound(notes, 1) // only what was sent in round 2
 */
export function feedbackOfRound<N extends { kind: string; fields: Record<string, string> | null }>(notes: readonly N[], round: number): N[] {
  return notes.filter((n) => n.kind === 'feedback' && (n.fields?.round ?? '0') === String(round));
}

/** What the closing asks of everyone: a reflection on the day and a next step. */
export const CLOSING_PARTS: readonly NotePart[] = [
  { id: 'reflection', label: 'Reflection', hint: 'What stays with you from today' },
  { id: 'next_step', label: 'Next step', hint: 'What you will do next' },
];

/**
 * The parts an activity's notes are filed under; empty for activities whose notes stand alone.
 * @example notePartsFor('empathy_map', { painsAndGains: true }).length // 6
 */
export function notePartsFor(type: ActivityType, settings: ActivitySettings): readonly NotePart[] {
  switch (type) {
    case 'interview':
      return INTERVIEW_PARTS;
    case 'empathy_map':
      return settings.painsAndGains ? [...EMPATHY_MAP_PARTS, ...PAINS_AND_GAINS_PARTS] : EMPATHY_MAP_PARTS;
    case 'test_rounds':
      return FEEDBACK_GRID_PARTS;
    case 'closing':
      return CLOSING_PARTS;
    default:
      return [];
  }
}

/** Every part a note can be filed under, by id (the ids are unique across activities). */
const PART_BY_ID: ReadonlyMap<string, NotePart> = new Map(
  [...INTERVIEW_PARTS, ...EMPATHY_MAP_PARTS, ...PAINS_AND_GAINS_PARTS, ...FEEDBACK_GRID_PARTS, ...CLOSING_PARTS].map((p) => [p.id, p]),
);

/**
 * A part's label in the room's words, for the results, the report and the exports; a part Cairn no longer
 * knows reads as its id in plain words ("old_part" → "Old part"), never as a raw id.
 * @example partLabel('says_does') // 'Says & does'
 */
export function partLabel(partId: string): string {
  const known = PART_BY_ID.get(partId)?.label;
  if (known) return known;
  const words = partId.replace(/[_-]+/g, ' ').trim();
  return words.charAt(0).toUpperCase() + words.slice(1);
}

/** Activities whose pairs rotate by round-robin (interviews and icebreakers use the same pairing). */
export const PAIRED_TYPES: ReadonlySet<ActivityType> = new Set(['icebreaker', 'interview']);
/** Activities that run in rounds: rotating pairs, and the test rounds' visits. */
export const ROUND_TYPES: ReadonlySet<ActivityType> = new Set(['icebreaker', 'interview', 'test_rounds']);
/** Activities whose notes belong to a team, so teammates see each other's notes appear. */
export const TEAM_TYPES: ReadonlySet<ActivityType> = new Set(['empathy_map', 'sketch', 'storyboard', 'test_rounds']);
/** Activities whose phones take photos. */
export const PHOTO_TYPES: ReadonlySet<ActivityType> = new Set(['sketch', 'storyboard']);

/** Cairn's limits on what phones send, checked on the server and hinted on the phone. */
export const ACTIVITY_LIMITS = {
  /** Characters of a note (the same as SubmissionInput's). */
  noteChars: NOTE_TEXT.max,
  /** Characters of one field of a guided sentence. */
  fieldChars: 200,
  /** Above this a field gets a gentle hint to say it shorter (common practice: a sticky note holds a short phrase). */
  fieldSoftChars: 80,
  /** Characters of a photo's caption. */
  captionChars: 140,
  /** Characters of a theme's name. */
  themeNameChars: 80,
  /** Bytes of one photo upload. */
  photoBytes: 8 * 1024 * 1024,
  /** Pixels of one photo (about a 50-megapixel camera); larger images, such as decompression bombs, are refused. */
  photoPixels: 50_000_000,
  /** Photos one person may add to one activity (eight sketches a person is common practice, plus retakes). */
  photosPerPersonPerItem: 30,
} as const;

/** The two guided sentences. */
export type GuidedKind = 'point_of_view' | 'how_might_we';

/** One field of a guided sentence. */
export interface GuidedField {
  id: string;
  label: string;
  /** What the field's input shows before anything is typed. */
  example: string;
  /** The gentle hint when the field is empty. */
  emptyHint: string;
}

/** A guided sentence: its fields in order and how they read as one sentence. */
export interface GuidedSentence {
  fields: readonly GuidedField[];
  /** The words around the fields, for the phone's preview. */
  compose(fields: Record<string, string>): string;
}

const clean = (s: string | undefined): string => (s ?? '').trim().replace(/\s+/g, ' ');
// The guided fields are parts of one sentence: a trailing full stop or question mark would sit mid-sentence.
const part = (s: string | undefined): string => clean(s).replace(/[.?!]+$/, '');

/**
 * The guided sentences: a point of view (d.school: user + need, as a verb + insight) and a how might
 * we question (published method cards: "How might we [action] for [user] so that [outcome]?").
 */
export const GUIDED_SENTENCES: Record<GuidedKind, GuidedSentence> = {
  point_of_view: {
    fields: [
      { id: 'user', label: 'User', example: 'A new member', emptyHint: 'Who is this about? Name the person, e.g. “a new member”.' },
      { id: 'need', label: 'Needs (a verb)', example: 'to find a free dock near home', emptyHint: 'What do they need to do? Start with a verb, e.g. “to find …”.' },
      { id: 'insight', label: 'Because (insight)', example: 'a full dock ends the first ride badly', emptyHint: 'Why? Add what you learned that makes this need matter.' },
    ],
    compose: (f) => `${part(f.user)} needs ${part(f.need)} because ${part(f.insight)}`,
  },
  how_might_we: {
    fields: [
      { id: 'action', label: 'How might we …', example: 'make unlocking a bike obvious', emptyHint: 'What could we do? Start with a verb, e.g. “make …”, “help …”.' },
      { id: 'user', label: 'for …', example: 'a new member', emptyHint: 'For whom? Name the person it helps.' },
      { id: 'outcome', label: 'so that …', example: 'their first ride starts without help', emptyHint: 'What would change for them? Say the outcome.' },
    ],
    compose: (f) => `How might we ${part(f.action)} for ${part(f.user)} so that ${part(f.outcome)}?`,
  },
};

/**
 * The sentence a guided form makes of its fields.
 * @example composeGuided('how_might_we', { action: 'make docks easy to find', user: 'a new member', outcome: 'the first ride ends well' })
 * // 'How might we make docks easy to find for a new member so that the first ride ends well?'
 */
export function composeGuided(kind: GuidedKind, fields: Record<string, string>): string {
  return GUIDED_SENTENCES[kind].compose(fields);
}

// A need stated as a thing, not a doing (common practice: d.school asks for the need as a verb).
const NOUN_START = /^(a|an|the|more|better|some|less|fewer|easier|faster)\b/i;

/**
 * Gentle hints for each field of a guided sentence, `null` where the field reads well: empty, longer
 * than reads well on a wall, over the limit, a need not said as a verb, or a question that repeats
 * "how might we".
 * @example guidedHints('point_of_view', { user: 'A new member', need: 'a map', insight: '' }).need // 'Say the need as something to do …'
 */
export function guidedHints(kind: GuidedKind, fields: Record<string, string>): Record<string, string | null> {
  const out: Record<string, string | null> = {};
  for (const f of GUIDED_SENTENCES[kind].fields) {
    const value = clean(fields[f.id]);
    if (!value) out[f.id] = f.emptyHint;
    else if (value.length > ACTIVITY_LIMITS.fieldChars) out[f.id] = `Too long to send: keep it under ${ACTIVITY_LIMITS.fieldChars} characters.`;
    else if (value.length > ACTIVITY_LIMITS.fieldSoftChars) out[f.id] = 'A shorter phrase reads better on the wall; try to say it in fewer words.';
    else if (kind === 'point_of_view' && f.id === 'need' && NOUN_START.test(value)) {
      out[f.id] = 'Say the need as something to do, e.g. “to find a dock” rather than “a map”.';
    } else if (kind === 'how_might_we' && f.id === 'action' && /^how might we\b/i.test(value)) {
      out[f.id] = 'No need to write “how might we” again: start with what we could do.';
    } else out[f.id] = null;
  }
  return out;
}

/** Whether a guided sentence can be sent: every field filled and within the limit (the other hints are advice only). */
export function guidedComplete(kind: GuidedKind, fields: Record<string, string>): boolean {
  return GUIDED_SENTENCES[kind].fields.every((f) => {
    const value = clean(fields[f.id]);
    return value.length > 0 && value.length <= ACTIVITY_LIMITS.fieldChars;
  });
}

