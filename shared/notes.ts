/**
 * What phones send in activities: the parts a note is filed under and the limits (which activity
 * files its notes under which parts is a trait in the activity library, shared/activities.ts).
 * Plain data and functions without the schema library, so a phone's page does not download it; the
 * schemas built on these live in shared/schemas/activities.ts, which re-exports this file.
 */
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
