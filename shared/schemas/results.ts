import { z } from 'zod';
import { ActivityType, Phase } from './agenda-item';
import { DayWindow } from './day-window';
import { Email } from './user';
import { countOf } from '../words';

/** A yes/no query parameter as a link carries it (`?anonymize=true`); absent means no. */
export const QueryFlag = z
  .enum(['true', 'false', '1', '0', 'yes', 'no'])
  .optional()
  .transform((v) => v === 'true' || v === '1' || v === 'yes');

/** Which sessions results cover: `day` (the default: the day's sessions, not rehearsals), `all`, or session ids separated by commas. */
export const SessionsQuery = z
  .string()
  .max(2000)
  .regex(/^(day|all|[A-Za-z0-9-]{1,64}(,[A-Za-z0-9-]{1,64})*)$/, 'Name the sessions as day, all, or session ids separated by commas')
  .optional();

/**
 * Query of the results, the exports and the report: `anonymize` replaces every name with "Participant N";
 * `sessions` chooses the live sessions (the day's by default).
 */
export const ResultsQuery = z.object({ anonymize: QueryFlag, sessions: SessionsQuery });
/** Query of the results, the exports and the report. */
export type ResultsQuery = z.infer<typeof ResultsQuery>;

/** The files a workshop's results export to: one CSV per table and the complete JSON. */
export const ExportFile = z.enum(['notes.csv', 'teams.csv', 'participants.csv', 'tallies.csv', 'votes.csv', 'results.json']);
/** One export file's name, e.g. `'notes.csv'`. */
export type ExportFile = z.infer<typeof ExportFile>;

/**
 * Query of a CSV export: `bom` starts the file with a UTF-8 byte-order mark, for spreadsheets;
 * `raw` keeps text that a spreadsheet would run as a formula exactly as written (neutralised otherwise).
 */
export const ExportQuery = ResultsQuery.extend({ bom: QueryFlag, raw: QueryFlag });
/** Query of a CSV export. */
export type ExportQuery = z.infer<typeof ExportQuery>;

/** One agenda item as it ran: planned clock times against the actual ones. */
export const AgendaRunRow = z.object({
  itemId: z.string(),
  /** 1-based position on the agenda. */
  position: z.number().int(),
  title: z.string(),
  type: ActivityType,
  phase: Phase,
  plannedStart: z.string(),
  plannedEnd: z.string(),
  plannedMin: z.number(),
  /** First start of the item (epoch ms), `null` if it never ran. */
  actualStart: z.number().nullable(),
  /** Last end of the item (epoch ms), `null` if it never ran or is still running. */
  actualEnd: z.number().nullable(),
  /** Minutes the item ran, over all its runs (going back to an item runs it again), to 0.1 min. */
  actualMin: z.number().nullable(),
  /** actualMin − plannedMin: positive when it took longer than planned. */
  overMin: z.number().nullable(),
  runCount: z.number().int(),
});
/** One agenda item as it ran. */
export type AgendaRunRow = z.infer<typeof AgendaRunRow>;

/** A note (or guided sentence, feedback, reflection, frame) as the results show it. */
export const NoteResult = z.object({
  id: z.string(),
  /** The live session it was written in, and that session's name ("Rehearsal · 2026-05-13 23:04"). */
  sessionId: z.string(),
  session: z.string(),
  itemId: z.string(),
  participantId: z.string(),
  /** The author's display name, or "Participant N" when names are removed. */
  author: z.string(),
  teamId: z.string().nullable(),
  teamName: z.string().nullable(),
  kind: z.string(),
  part: z.string().nullable(),
  text: z.string(),
  fields: z.record(z.string(), z.string()).nullable(),
  themeId: z.string().nullable(),
  themeName: z.string().nullable(),
  createdAt: z.number(),
});
/** A note as the results show it. */
export type NoteResult = z.infer<typeof NoteResult>;

/** Notes grouped under one theme or one team. */
export const NoteGroup = z.object({ key: z.string(), label: z.string(), notes: z.array(NoteResult) });
/** Notes grouped under one theme or one team. */
export type NoteGroup = z.infer<typeof NoteGroup>;

/** One option's line in a vote result. */
export const VoteRow = z.object({
  optionId: z.string(),
  label: z.string(),
  /** Dots, or points for a preference vote. */
  score: z.number(),
  /** Standard competition rank ("1224"). */
  rank: z.number().int(),
  tied: z.boolean(),
  nearTie: z.boolean(),
  selected: z.boolean(),
  /** Where the option stands in the criteria matrix ("Impact high · Effort low"), in a ranking by the matrix. */
  quadrant: z.string().nullable().optional(),
  /** The same quadrant as levels, for a screen to word in its language. */
  levels: z.object({ y: z.enum(['high', 'low']), x: z.enum(['high', 'low']) }).nullable().optional(),
});
/** One option's line in a vote result. */
export type VoteRow = z.infer<typeof VoteRow>;

/** A point of the criteria matrix: one option's dots under two criteria, and its quadrant in words; in the matrix's rank order. */
export const MatrixPoint = z.object({
  optionId: z.string(),
  label: z.string(),
  x: z.number(),
  y: z.number(),
  quadrant: z.string(),
  /** The quadrant as levels, for a screen to word in its language. */
  levels: z.object({ y: z.enum(['high', 'low']), x: z.enum(['high', 'low']) }).optional(),
});
/** A point of the criteria matrix. */
export type MatrixPoint = z.infer<typeof MatrixPoint>;

/** The live session a results section comes from (set once the providers have built it). */
const FromSession = { sessionId: z.string().optional(), session: z.string().optional() };

/** The sections an activity's results can have; each comes from one provider on the server. */
export const ResultSection = z.discriminatedUnion('kind', [
  z.object({
    ...FromSession,
    kind: z.literal('notes'),
    total: z.number().int(),
    byTheme: z.array(NoteGroup),
    byTeam: z.array(NoteGroup),
  }),
  z.object({
    ...FromSession,
    kind: z.literal('feedback'),
    /** The feedback capture grid of each team tested: four parts, each a list of notes. */
    grids: z.array(
      z.object({
        teamId: z.string().nullable(),
        teamName: z.string(),
        parts: z.array(z.object({ part: z.string(), label: z.string(), notes: z.array(NoteResult) })),
      }),
    ),
  }),
  z.object({
    ...FromSession,
    kind: z.literal('storyboards'),
    boards: z.array(
      z.object({
        teamId: z.string().nullable(),
        teamName: z.string(),
        frames: z.array(z.object({ position: z.number().int(), text: z.string(), photoId: z.string().nullable() })),
      }),
    ),
  }),
  z.object({
    ...FromSession,
    kind: z.literal('photos'),
    photos: z.array(
      z.object({
        id: z.string(),
        caption: z.string(),
        teamName: z.string().nullable(),
        author: z.string(),
        /** Whether the picture may be shown: it shows nobody, or everyone in it agreed and its author has photo consent. */
        shown: z.boolean(),
        /** The thumbnail's API path (read with the caller's token), `null` when the picture is withheld. */
        url: z.string().nullable(),
        /** Feedback others gave on this sketch. */
        feedback: z.array(NoteResult),
      }),
    ),
    /** Photos left out because a person in them did not consent (or withdrew). */
    withheld: z.number().int(),
  }),
  z.object({
    ...FromSession,
    kind: z.literal('votes'),
    /** How the scores were counted: dots, a preference method, or first choices of a team sort. */
    method: z.enum(['dots', 'borda', 'schulze', 'first_choices']),
    /** The vote was still open when these results were read (only closed votes are final). */
    open: z.boolean(),
    /** What the main ranking counts, in English for the report and API clients, e.g. "All criteria together", "Impact", "Head-to-head". */
    rankedBy: z.string(),
    /** The same as a kind with the criteria's names (shared/matrix.ts rankingOf), for a screen to word in its language. */
    ranking: z
      .union([
        z.object({ kind: z.literal('matrix'), first: z.string(), second: z.string() }),
        z.object({ kind: z.literal('criterion'), criterion: z.string() }),
        z.object({ kind: z.enum(['all', 'dots', 'borda', 'schulze', 'first_choices']) }),
      ])
      .optional(),
    /** The criterion whose dots the main score column counts (a ranking by the matrix), for a screen to word. */
    scoreCriterion: z.string().nullable().optional(),
    /** What the main ranking's score column counts where it is not what the method counts (a matrix ranking: the first criterion's dots). */
    scoreLabel: z.string().nullable().optional(),
    /** The ranking that carries options forward (dots overall or by the ranking criterion, or the chosen method). */
    overall: z.array(VoteRow),
    /** Further rankings: one per criterion of a dot vote, or the other method of a preference vote. */
    tables: z.array(z.object({ id: z.string(), label: z.string(), rows: z.array(VoteRow) })),
    topN: z.number().int().nullable(),
    tiePolicy: z.string().nullable(),
    /** The tie policy's line as numbers (shared/tally.ts tieLine), for a screen to word in its language. */
    tie: z.object({ places: z.number().int(), open: z.number().int(), count: z.number().int(), unvoted: z.boolean() }).nullable().optional(),
    /** Labels of the options tied across the top-N cut-off, for the facilitator to break. */
    tiedAtCutoff: z.array(z.string()),
    /** The options across the cut-off got no votes at all: no tie, places to fill by picking. */
    unvotedAtCutoff: z.boolean().optional(),
    /** The criteria matrix of a dot vote with two criteria or more (first criterion up, second across). */
    matrix: z
      .object({
        xLabel: z.string(),
        yLabel: z.string(),
        /** What a dot means under each criterion (shared/matrix.ts): sets which way the plot's axes run. */
        xMeans: z.enum(['high', 'low']),
        yMeans: z.enum(['high', 'low']),
        points: z.array(MatrixPoint),
      })
      .nullable(),
    /** The pairwise table of a preference vote: `d[i][j]` voters prefer option i to option j. */
    pairwise: z.object({ labels: z.array(z.string()), d: z.array(z.array(z.number())) }).nullable(),
    voters: z.number().int(),
    voted: z.number().int(),
  }),
  z.object({ ...FromSession, kind: z.literal('reflections'), notes: z.array(NoteResult) }),
]);
/** One section of an activity's results. */
export type ResultSection = z.infer<typeof ResultSection>;

/**
 * What a vote table's score column counts: a Borda table counts points and a Schulze table wins,
 * whichever of the two carries the options forward (`tableId` is a further table's id; none for the main one).
 * @example voteScoreLabel('schulze', 'borda') // 'Points'
 */
export function voteScoreLabel(method: 'dots' | 'borda' | 'schulze' | 'first_choices', tableId?: string): string {
  const by = tableId === 'borda' || tableId === 'schulze' ? tableId : method;
  return { dots: 'Dots', borda: 'Points', schulze: 'Wins', first_choices: 'First choices' }[by];
}

/** One agenda item with its results, in agenda order. */
export const ActivityResult = z.object({
  itemId: z.string(),
  position: z.number().int(),
  title: z.string(),
  type: ActivityType,
  phase: Phase,
  prompt: z.string(),
  sections: z.array(ResultSection),
});
/** One agenda item with its results. */
export type ActivityResult = z.infer<typeof ActivityResult>;

/** A team with its challenge and members. */
export const TeamResult = z.object({
  id: z.string(),
  /** The name of the live session the team was formed in. */
  session: z.string(),
  name: z.string(),
  challenge: z.string().nullable(),
  members: z.array(z.object({ participantId: z.string(), name: z.string() })),
});
/** A team with its challenge and members. */
export type TeamResult = z.infer<typeof TeamResult>;

/** Who took part, and how much. */
export const Participation = z.object({
  joined: z.number().int(),
  withPhotoConsent: z.number().int(),
  /** Participants who left an e-mail address for the report. */
  withAddress: z.number().int(),
  notesTotal: z.number().int(),
  perActivity: z.array(
    z.object({
      itemId: z.string(),
      title: z.string(),
      contributors: z.number().int(),
      notes: z.number().int(),
      /** A vote's ballots cast (who placed a dot or sent a ranking); `null` for an activity that is not a vote. */
      ballots: z.number().int().nullable(),
      /** contributors ÷ joined, 0 when nobody joined. */
      rate: z.number(),
    }),
  ),
});
/** Who took part, and how much. */
export type Participation = z.infer<typeof Participation>;

/**
 * What an activity's row of the participation table counts: a vote's ballots, otherwise its notes.
 * @example contributionsText({ notes: 0, ballots: 3 }) // '3 ballots'
 */
export function contributionsText(a: { notes: number; ballots: number | null }): string {
  if (a.ballots !== null) return countOf(a.ballots, 'ballot');
  return countOf(a.notes, 'note');
}

/** A participant as the exports list them (no address: only whether one was left). */
export const ParticipantResult = z.object({
  id: z.string(),
  /** The name of the live session they joined. */
  session: z.string(),
  /** 1-based, in order of joining over the workshop's sessions: "Participant N" uses it. */
  number: z.number().int(),
  name: z.string(),
  teamName: z.string().nullable(),
  photoConsent: z.boolean(),
  leftAddress: z.boolean(),
  joinedAt: z.number(),
  notes: z.number().int(),
});
/** A participant as the exports list them. */
export type ParticipantResult = z.infer<typeof ParticipantResult>;

/** A dot placed (or a ballot's position) as the votes export lists it. */
export const VoteRecord = z.object({
  itemId: z.string(),
  /** The name of the live session the vote was cast in. */
  session: z.string(),
  activity: z.string(),
  voter: z.string(),
  option: z.string(),
  criterion: z.string(),
  /** Dots for a dot vote, the 1-based place for a preference vote. */
  value: z.number(),
});
/** A dot or ballot position as the votes export lists it. */
export type VoteRecord = z.infer<typeof VoteRecord>;

/** A workshop's results: brief, agenda as run, every activity's results, teams, participation and next steps. */
export const WorkshopResults = z.object({
  generatedAt: z.number(),
  /** Names were replaced with "Participant N" for this copy. */
  anonymized: z.boolean(),
  workshop: z.object({
    id: z.string(),
    title: z.string(),
    objective: z.string(),
    persona: z.string(),
    date: z.string(),
    window: DayWindow,
    ownerName: z.string(),
    headcount: z.number().int(),
  }),
  /** Every live session of the workshop, oldest first; `included` marks the ones these results cover, each with its own agenda as run. */
  sessions: z.array(
    z.object({
      id: z.string(),
      kind: z.enum(['rehearsal', 'day']),
      /** How the results name it, e.g. "The day · 2026-05-14 09:58". */
      name: z.string(),
      status: z.enum(['live', 'ended']),
      startedAt: z.number(),
      endedAt: z.number().nullable(),
      included: z.boolean(),
      /** The agenda as this session ran it (empty for a session the results do not cover). */
      agenda: z.array(AgendaRunRow),
    }),
  ),
  /** Which sessions were asked for: `day`, `all`, or the ids. */
  sessionSelector: z.union([z.enum(['day', 'all']), z.array(z.string())]),
  /** The planned agenda; its actual times are those of the one session covered, or empty when several are. */
  agenda: z.array(AgendaRunRow),
  activities: z.array(ActivityResult),
  /** Every note the facilitators kept (hidden ones left out), oldest first; the sections group the same notes. */
  notes: z.array(NoteResult),
  teams: z.array(TeamResult),
  participants: z.array(ParticipantResult),
  participation: Participation,
  votes: z.array(VoteRecord),
  /** The closing reflections: what happens next. */
  nextSteps: z.array(NoteResult),
  /** When names, photos and addresses were deleted, `null` if never. */
  personalDataDeletedAt: z.number().nullable(),
});
/** A workshop's results. */
export type WorkshopResults = z.infer<typeof WorkshopResults>;

/** Who the report can be sent to: the workshop's members (a link) and participants who left an address (the PDF). */
export const ReportRecipients = z.object({
  members: z.array(z.object({ userId: z.string(), name: z.string(), email: z.string(), role: z.enum(['cofacilitator', 'observer']) })),
  participants: z.array(z.object({ participantId: z.string(), name: z.string(), maskedEmail: z.string() })),
});
/** Who the report can be sent to. */
export type ReportRecipients = z.infer<typeof ReportRecipients>;

/** Body of sending the report by e-mail to chosen members and participants. */
export const SendReportBody = z
  .object({
    memberIds: z.array(z.string().min(1).max(64)).max(100).default([]),
    participantIds: z.array(z.string().min(1).max(64)).max(1000).default([]),
    /** A short note from the facilitator at the top of the message. */
    note: z.string().trim().max(1000, 'Keep the note under 1000 characters').default(''),
  })
  .refine((b) => b.memberIds.length + b.participantIds.length > 0, { message: 'Choose at least one person to send the report to', path: ['memberIds'], params: { reason: 'report_nobody' } });
/** Body of sending the report by e-mail. */
export type SendReportBody = z.infer<typeof SendReportBody>;

/** What sending the report did. */
export const SendReportAnswer = z.object({
  /** Members who got a link. */
  links: z.number().int(),
  /** Participants who got the PDF. */
  attachments: z.number().int(),
});
/** What sending the report did. */
export type SendReportAnswer = z.infer<typeof SendReportAnswer>;

/** Most days a facilitator may keep personal data before it is deleted automatically (about two years). */
export const MAX_RETENTION_DAYS = 730;

/** Body of setting the automatic deletion of a workshop's personal data: days after the last live session ended, or `null` for never. */
export const RetentionBody = z.object({
  retentionDays: z
    .number({ error: 'Enter a number of days, or choose to keep the data' })
    .int('Use whole days')
    .min(0, 'Days cannot be negative')
    .max(MAX_RETENTION_DAYS, `Keep it to at most ${MAX_RETENTION_DAYS} days`)
    .nullable(),
});
/** Body of setting the automatic deletion of personal data. */
export type RetentionBody = z.infer<typeof RetentionBody>;

/** Body of deleting a workshop's personal data now: the facilitator confirms on purpose. */
export const DeleteNowBody = z.object({ confirm: z.literal(true, { error: 'Confirm that the names, photos and addresses are to be deleted' }) });

/** A workshop's personal data and when it goes. */
export const RetentionStatus = z.object({
  retentionDays: z.number().int().nullable(),
  /** When the automatic deletion is due (epoch ms), `null` when none is set or no session has ended yet. */
  dueAt: z.number().nullable(),
  personalDataDeletedAt: z.number().nullable(),
  /** A live session is running: deletion waits until it ends. */
  liveNow: z.boolean(),
  /** What is still held: named participants, e-mail addresses and photos. */
  held: z.object({ names: z.number().int(), addresses: z.number().int(), photos: z.number().int() }),
});
/** A workshop's personal data and when it goes. */
export type RetentionStatus = z.infer<typeof RetentionStatus>;

/** Body with which a participant leaves (or takes back, with `null`) an e-mail address for the report. */
export const ReportEmailBody = z.object({ email: Email.nullable() });
/** Body with which a participant leaves an e-mail address for the report. */
export type ReportEmailBody = z.infer<typeof ReportEmailBody>;

/** What a participant's phone may see of the data Cairn keeps about them. */
export const MyData = z.object({
  displayName: z.string(),
  photoConsent: z.boolean(),
  email: z.string().nullable(),
  notes: z.number().int(),
  /** The workshop's automatic deletion: days after the session ends, `null` when the data is kept until deleted by hand. */
  retentionDays: z.number().int().nullable(),
});
/** What a participant's phone may see of the data Cairn keeps about them. */
export type MyData = z.infer<typeof MyData>;
