import { z } from 'zod';
import { ActivitySettings, ActivityType, Phase } from './agenda-item';
import { typedText } from './text';
import { NOTE_TEXT } from '../notes';
import { LOCALES } from '../locales';

/** Alphabet of join codes: no 0/O, 1/I/L, so a code read off the projector is typed right. */
export const JOIN_CODE_ALPHABET = '23456789ABCDEFGHJKMNPQRSTUVWXYZ';
/** Length of a join code: 7 characters from 31 give about 2.75e10 codes, too many to guess at a limited rate. */
export const JOIN_CODE_LENGTH = 7;

/** A join code as typed by a participant: case and spaces forgiven, then checked against the alphabet. */
export const JoinCode = z
  .string()
  .transform((s) => s.replace(/[\s-]/g, '').toUpperCase())
  .pipe(
    z
      .string()
      .length(JOIN_CODE_LENGTH, `A join code has ${JOIN_CODE_LENGTH} characters`)
      .regex(new RegExp(`^[${JOIN_CODE_ALPHABET}]+$`), 'That is not a Cairn join code'),
  );

/** The shared countdown as the server owns it (see shared/clock.ts). */
export const TimerState = z.object({
  status: z.enum(['idle', 'running', 'paused', 'ended']),
  endsAt: z.number().nullable(),
  remainingMs: z.number().nullable(),
  durationMs: z.number(),
});
/** The shared countdown as the server owns it. */
export type TimerState = z.infer<typeof TimerState>;

/** The current activity as every screen may see it. */
export const LiveItem = z.object({
  id: z.string(),
  index: z.number().int(),
  type: ActivityType,
  phase: Phase,
  title: z.string(),
  prompt: z.string(),
  timeboxMin: z.number(),
  settings: ActivitySettings,
});
/** The current activity as every screen may see it. */
export type LiveItem = z.infer<typeof LiveItem>;

/** Whether a live session is a rehearsal or the workshop's day itself (results cover the day unless asked otherwise). */
export const SessionKind = z.enum(['rehearsal', 'day']);
/** `'rehearsal'` or `'day'`. */
export type SessionKind = z.infer<typeof SessionKind>;

/** Body of starting a live session: what kind of session it is (the day, when not said). */
export const StartLiveBody = z.object({ kind: SessionKind.default('day') });
/** Body of starting a live session. */
export type StartLiveBody = z.infer<typeof StartLiveBody>;

/** Body of marking a session as a rehearsal or the day. */
export const SessionKindBody = z.object({ kind: SessionKind });
/** Body of marking a session as a rehearsal or the day. */
export type SessionKindBody = z.infer<typeof SessionKindBody>;

/** Body of discarding a session: the facilitator confirms on purpose. */
export const DiscardSessionBody = z.object({
  confirm: z.literal(true, { error: "Confirm that the session's participants, notes, photos and votes are to be deleted" }),
});

/** A live session of a workshop as the plan lists it. */
export const SessionSummary = z.object({
  id: z.string(),
  kind: SessionKind,
  status: z.enum(['live', 'ended']),
  startedAt: z.number(),
  endedAt: z.number().nullable(),
  /** Participants who joined it. */
  joined: z.number().int(),
  /** Notes, sentences, feedback and frames submitted in it. */
  notes: z.number().int(),
  /** Ballots cast in its votes (one per voter and vote). */
  votes: z.number().int(),
});
/** A live session as the plan lists it. */
export type SessionSummary = z.infer<typeof SessionSummary>;

/** When an agenda item actually ran (epoch ms), for drift against the plan. */
export const ItemRun = z.object({ itemId: z.string(), startedAt: z.number(), endedAt: z.number().nullable() });
/** When an agenda item actually ran. */
export type ItemRun = z.infer<typeof ItemRun>;

/** The live session's state, owned by the server and pushed to every screen in the session. */
export const LiveState = z.object({
  sessionId: z.string(),
  workshopId: z.string(),
  workshopTitle: z.string(),
  joinCode: z.string(),
  joinUrl: z.string(),
  status: z.enum(['live', 'ended']),
  kind: SessionKind,
  /** The run's own timeboxes where cuts shortened items for this session only (agenda item id → minutes). */
  timeboxes: z.record(z.string(), z.number()),
  /** The last cut can be undone. */
  canUndoCuts: z.boolean(),
  /** Index of the current agenda item. */
  currentIndex: z.number().int(),
  itemCount: z.number().int(),
  item: LiveItem.nullable(),
  timer: TimerState,
  /** Input is locked: phones show the activity but cannot submit. */
  locked: z.boolean(),
  /** Results of the current activity are shown on the projector. */
  revealed: z.boolean(),
  /** The last short message the facilitator sent to all phones. */
  message: z.object({ id: z.string(), text: z.string(), sentAt: z.number() }).nullable(),
  /** The language the projector shows, picked by a facilitator for this session. */
  projectorLocale: z.enum(LOCALES),
  participantCount: z.number().int(),
  onlineCount: z.number().int(),
  /** Actual start and end of each item run so far. */
  runs: z.array(ItemRun),
  /** Increases with every change; screens ignore a state older than the one they show. */
  version: z.number().int(),
  /** Server time (epoch ms) when this state was sent. */
  serverTime: z.number(),
});
/** The live session's state. */
export type LiveState = z.infer<typeof LiveState>;

/**
 * The live state a phone gets, pushed and on resync: what it shows, without the room's counts and the
 * day's history of runs, so a change costs the same small message at 09:00 and at 16:00.
 */
export const PhoneState = LiveState.omit({ runs: true, participantCount: true, onlineCount: true, joinUrl: true });
/** The live state a phone gets. */
export type PhoneState = z.infer<typeof PhoneState>;

/** A live state as any screen holds it: a phone's lacks the counts and the runs that the console and projector get. */
export type ScreenState = PhoneState & Partial<Omit<LiveState, keyof PhoneState>>;

/**
 * A screen's live state trimmed to a phone's.
 * @example phoneStateOf(state).runs // undefined
 */
export function phoneStateOf(state: LiveState): PhoneState {
  const { runs: _runs, participantCount: _p, onlineCount: _o, joinUrl: _j, ...phone } = state;
  return phone;
}

/** A participant as the console sees them. */
export const ParticipantView = z.object({
  id: z.string(),
  displayName: z.string(),
  photoConsent: z.boolean(),
  teamId: z.string().nullable(),
  online: z.boolean(),
  joinedAt: z.number(),
});
/** A participant as the console sees them. */
export type ParticipantView = z.infer<typeof ParticipantView>;

/** What a participant's own phone knows about them. */
export const Me = z.object({
  id: z.string(),
  displayName: z.string(),
  photoConsent: z.boolean(),
  teamId: z.string().nullable(),
});
/** What a participant's own phone knows about them. */
export type Me = z.infer<typeof Me>;

/** A display name as typed on the phone. */
export const DisplayName = typedText({
  required: 'Enter a name the room will know you by',
  max: 40,
  tooLong: 'Keep your name under 40 characters',
});

/** Body of joining a live session from a phone. */
export const JoinBody = z.object({
  displayName: DisplayName,
  photoConsent: z.boolean({ error: 'Choose whether photos of you may be shown' }),
  /** A random id the phone keeps, so rate limits and rejoining work per device, not per IP. */
  deviceId: z.string().min(8).max(64),
  /** The phone's language, for the e-mail with the report (English when left out). */
  locale: z.enum(LOCALES).optional(),
});
/** Body of joining a live session. */
export type JoinBody = z.infer<typeof JoinBody>;

/** Answer of joining: the participant token and who they are. */
export const JoinAnswer = z.object({ token: z.string(), sessionId: z.string(), me: Me });
/** Answer of joining. */
export type JoinAnswer = z.infer<typeof JoinAnswer>;

/** What a phone may learn about a session before joining it. */
export const JoinInfo = z.object({
  sessionId: z.string(),
  workshopTitle: z.string(),
  consentText: z.string(),
  /** Days after the session ends that names, photos and addresses are deleted; `null`: kept until the facilitator deletes them. */
  retentionDays: z.number().int().nullable(),
});
/** What a phone may learn about a session before joining it. */
export type JoinInfo = z.infer<typeof JoinInfo>;

/** What the facilitator gets when starting (or reopening) a live session. */
export const LiveSessionInfo = z.object({
  sessionId: z.string(),
  joinCode: z.string(),
  joinUrl: z.string(),
  /** A link that opens the projector screen without signing in (read-only). */
  displayUrl: z.string(),
  status: z.enum(['live', 'ended']),
  kind: SessionKind,
});
/** What the facilitator gets when starting a live session. */
export type LiveSessionInfo = z.infer<typeof LiveSessionInfo>;

/** Fields one note may carry: a guided sentence has three, a test round's feedback two (common practice: headroom of twice that). */
export const NOTE_FIELDS_MAX = 8;

/** A submission from a phone; `clientId` makes a retried submission land once. */
export const SubmissionInput = z.object({
  clientId: z.string().min(8).max(64),
  itemId: z.string().min(1).max(64),
  /** What kind of input: a note, a quadrant note, a guided sentence, feedback, a reflection, a storyboard frame, a sketch's photo. */
  kind: z.enum(['note', 'point_of_view', 'how_might_we', 'feedback', 'reflection', 'frame', 'sketch']),
  /** Quadrant or part (says / thinks / does / feels, worked / didnt / questions / ideas …). */
  part: z.string().max(30).optional(),
  text: typedText(NOTE_TEXT),
  /** Structured fields of guided sentences (user, need, insight …). */
  fields: z
    .record(z.string().max(30), z.string().max(300))
    .refine((f) => Object.keys(f).length <= NOTE_FIELDS_MAX, `A note carries at most ${NOTE_FIELDS_MAX} fields`)
    .optional(),
});
/** A submission from a phone. */
export type SubmissionInput = z.infer<typeof SubmissionInput>;

/** A stored submission as facilitators see it. */
export const SubmissionView = z.object({
  id: z.string(),
  itemId: z.string(),
  participantId: z.string(),
  displayName: z.string(),
  teamId: z.string().nullable(),
  kind: SubmissionInput.shape.kind,
  part: z.string().nullable(),
  text: z.string(),
  fields: z.record(z.string(), z.string()).nullable(),
  hidden: z.boolean(),
  createdAt: z.number(),
});
/** A stored submission as facilitators see it. */
export type SubmissionView = z.infer<typeof SubmissionView>;
