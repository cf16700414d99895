import { z } from 'zod';
import { typedText } from './text';
import { SubmissionInput } from './live';

// The parts, guided sentences and limits live in a file without zod, which the phone's code imports.
export * from '../notes';
import { ACTIVITY_LIMITS } from '../notes';
import { GUIDED_SENTENCES, type GuidedKind } from '../guided';

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
