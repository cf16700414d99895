import { z } from 'zod';
import { typedText } from '../text';
import type { ActivitySettings, ActivityType } from './agenda-item';
import { SubmissionInput } from './live';

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
  { id: 'sees', label: 'Sees', hint: 'Around them on the first ride' },
  { id: 'hears', label: 'Hears', hint: 'From friends, staff, the app' },
  { id: 'says_does', label: 'Says & does', hint: 'Out loud, in the open' },
  { id: 'thinks_feels', label: 'Thinks & feels', hint: 'Worries and hopes' },
];

/** The extra quadrants of an empathy map whose item sets `painsAndGains`. */
export const PAINS_AND_GAINS_PARTS: readonly NotePart[] = [
  { id: 'pains', label: 'Pains', hint: 'Fears, frustrations, obstacles' },
  { id: 'gains', label: 'Gains', hint: 'Wants, needs, measures of success' },
];

/** The four parts of the feedback capture grid (d.school method card), in Cairn's plain words. */
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
  noteChars: 500,
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

/** The fields of a guided sentence as the server accepts them: exactly its fields, each filled and within the limit. */
export function guidedFieldsSchema(kind: GuidedKind): z.ZodType<Record<string, string>> {
  const shape: Record<string, z.ZodString> = {};
  for (const f of GUIDED_SENTENCES[kind].fields) {
    shape[f.id] = z
      .string()
      .trim()
      .min(1, f.emptyHint)
      .max(ACTIVITY_LIMITS.fieldChars, `Keep “${f.label}” under ${ACTIVITY_LIMITS.fieldChars} characters`);
  }
  return z.object(shape).strict();
}

const Id = z.string().min(1).max(64);
const ThemeName = typedText({
  required: 'Give the theme a name',
  max: ACTIVITY_LIMITS.themeNameChars,
  tooLong: `Keep a theme's name under ${ACTIVITY_LIMITS.themeNameChars} characters`,
});

/** Payloads of the activity commands, parsed on the server with these schemas. */
export const ActivityPayloads = {
  /** `activity:board`, `notes:list`, `rounds:get`. */
  item: z.object({ itemId: Id }).strict(),
  /** `notes:hide`: hide notes from the room, or show them again (undo). */
  hide: z.object({ noteIds: z.array(Id).min(1).max(200), hidden: z.boolean() }).strict(),
  /** `notes:merge`: the duplicates go under the kept note. */
  merge: z.object({ keepId: Id, duplicateIds: z.array(Id).min(1).max(50) }).strict(),
  /** `notes:unmerge`: a merged duplicate stands on its own again. */
  unmerge: z.object({ noteId: Id }).strict(),
  /** `themes:create`: a new theme, with the notes dropped into it. */
  themeCreate: z.object({ itemId: Id, name: ThemeName, noteIds: z.array(Id).max(500).default([]) }).strict(),
  /** `themes:apply`: accept suggested themes (as changed by the facilitator). */
  themeApply: z
    .object({ itemId: Id, groups: z.array(z.object({ name: ThemeName, noteIds: z.array(Id).min(1).max(500) }).strict()).min(1).max(50) })
    .strict(),
  /** `themes:rename`. */
  themeRename: z.object({ themeId: Id, name: ThemeName }).strict(),
  /** `themes:delete`: its notes go back to the ungrouped ones. */
  themeDelete: z.object({ themeId: Id }).strict(),
  /** `themes:assign`: move notes into a theme (`null`: back to the ungrouped ones). */
  themeAssign: z.object({ themeId: Id.nullable(), noteIds: z.array(Id).min(1).max(500) }).strict(),
  /** `notes:promote`: a note or a theme becomes an option of a later vote. */
  promote: z.object({ sourceKind: z.enum(['note', 'theme']), sourceId: Id }).strict(),
  /** `notes:unpromote`. */
  unpromote: z.object({ promotionId: Id }).strict(),
  /** `notes:promoted`: every promotion of the session, or of one item. */
  promoted: z.object({ itemId: Id.optional() }).strict(),
  /** `rounds:set`: go to a round (0-based); `regroup` draws the pairs again from whoever is online now. */
  roundSet: z.object({ itemId: Id, round: z.number().int().min(0).max(99), regroup: z.boolean().optional() }).strict(),
  /** `storyboard:reorder` (a phone, its own team's story). */
  reorder: z.object({ itemId: Id, frameIds: z.array(Id).max(200) }).strict(),
  /** `storyboard:arrange` (the console, any story). */
  arrange: z.object({ itemId: Id, storyKey: z.string().min(1).max(70), frameIds: z.array(Id).max(200) }).strict(),
};

// Multipart fields arrive as strings.
const FormBoolean = z.enum(['true', 'false']).transform((v) => v === 'true');

/** The fields of a photo upload (multipart, beside the file `photo`). */
export const PhotoUploadFields = z.object({
  itemId: Id,
  clientId: z.string().min(8).max(64),
  caption: typedText({
    required: 'Add a caption: what does the photo show?',
    max: ACTIVITY_LIMITS.captionChars,
    tooLong: `Keep the caption under ${ACTIVITY_LIMITS.captionChars} characters`,
  }),
  showsPeople: FormBoolean,
  peopleConsent: FormBoolean.default(false),
});
/** The fields of a photo upload. */
export type PhotoUploadFields = z.infer<typeof PhotoUploadFields>;

/** The answer to a photo upload: its submission and photo (a retried upload answers with the first). */
export const PhotoUploadAnswer = z.object({ submissionId: z.string(), photoId: z.string(), duplicate: z.boolean() });
/** The answer to a photo upload. */
export type PhotoUploadAnswer = z.infer<typeof PhotoUploadAnswer>;

/** A photo as a screen may show it; `blurred` means the server serves only a blurred copy to this screen. */
export const PhotoView = z.object({
  id: z.string(),
  width: z.number().int(),
  height: z.number().int(),
  showsPeople: z.boolean(),
  blurred: z.boolean(),
});
/** A photo as a screen may show it. */
export type PhotoView = z.infer<typeof PhotoView>;

/**
 * A note as one screen sees it. The console sees everything (names, hidden and merged notes); the
 * projector sees the room's notes without names; a phone sees its own and its team's.
 */
export const NoteView = z.object({
  id: z.string(),
  itemId: z.string(),
  kind: SubmissionInput.shape.kind,
  part: z.string().nullable(),
  text: z.string(),
  fields: z.record(z.string(), z.string()).nullable(),
  teamId: z.string().nullable(),
  /** Whose story a storyboard frame belongs to: the team, or the person when they have none. */
  storyKey: z.string(),
  themeId: z.string().nullable(),
  mergedIntoId: z.string().nullable(),
  /** How many duplicates were merged into this note. */
  duplicates: z.number().int(),
  hidden: z.boolean(),
  participantId: z.string().nullable(),
  displayName: z.string().nullable(),
  photo: PhotoView.nullable(),
  createdAt: z.number(),
});
/** A note as one screen sees it. */
export type NoteView = z.infer<typeof NoteView>;

/** An affinity theme. */
export const ThemeView = z.object({ id: z.string(), name: z.string(), position: z.number().int() });
/** An affinity theme. */
export type ThemeView = z.infer<typeof ThemeView>;

/** A note or theme promoted to an option of a later vote, as `notes:promoted` answers it. */
export const PromotedOption = z.object({
  id: z.string(),
  text: z.string(),
  sourceKind: z.enum(['note', 'theme']),
  /** The promoted note's or theme's id. */
  sourceId: z.string(),
  /** The agenda item the note or theme came from. */
  itemId: z.string(),
});
/** A note or theme promoted to an option of a later vote. */
export type PromotedOption = z.infer<typeof PromotedOption>;

/** A person as rounds show them. */
export const PersonRef = z.object({ id: z.string(), displayName: z.string() });
/** A person as rounds show them. */
export type PersonRef = z.infer<typeof PersonRef>;

/** A team as the activity screens show it. */
export const TeamRef = z.object({ id: z.string(), name: z.string(), memberIds: z.array(z.string()) });
/** A team as the activity screens show it. */
export type TeamRef = z.infer<typeof TeamRef>;

/** What an activity shows of one agenda item: notes, themes, teams, the storyboards' order. */
export const ActivityBoard = z.object({
  itemId: z.string(),
  notes: z.array(NoteView),
  themes: z.array(ThemeView),
  teams: z.array(TeamRef),
  /** Frame ids in story order, per story key (teams, or a person without one). */
  frameOrders: z.record(z.string(), z.array(z.string())),
  /** The item's promotions (the console only; empty elsewhere). */
  promotions: z.array(PromotedOption),
});
/** What an activity shows of one agenda item. */
export type ActivityBoard = z.infer<typeof ActivityBoard>;

/** The round of an activity run in rounds: rotating pairs, or test rounds' visits. */
export const RoundView = z.object({
  itemId: z.string(),
  /** 0-based; screens show round + 1. */
  round: z.number().int(),
  /** Rounds planned (the item's setting, else a full rotation). */
  roundCount: z.number().int(),
  pairs: z.array(z.object({ a: PersonRef, b: PersonRef })),
  resting: PersonRef.nullable(),
  /** People who joined after the pairs were drawn (the console can pair again to include them). */
  newcomers: z.array(PersonRef),
  /** Test rounds: which team's prototype each tester visits this round. */
  visits: z.array(z.object({ tester: PersonRef, testerTeamId: z.string(), hostTeamId: z.string() })),
  teams: z.array(TeamRef),
});
/** The round of an activity run in rounds. */
export type RoundView = z.infer<typeof RoundView>;
