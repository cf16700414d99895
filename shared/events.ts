import { z } from 'zod';
import type { ErrorCode, ErrorParams, ErrorReason, FieldIssue } from './errors';
import { LOCALES } from './locales';
import { SubmissionInput, type LiveState, type Me, type ParticipantView, type ScreenState, type SubmissionView } from './schemas/live';
import { FormTeamsPayload, SetTeamsPayload, type Team } from './schemas/team';
import {
  ChoosePayload,
  DotPayload,
  ProposeTeamsPayload,
  RankPayload,
  VoteSetupPayload,
  type BallotAnswer,
  type MyBallot,
  type TeamProposal,
  type VoteResults,
  type VoteSources,
  type VoteView,
} from './schemas/voting';
import { ActivityPayloads, type ActivityBoard, type PromotedOption, type NoteView, type RoundView, type ThemeView } from './schemas/activities';

/** Every socket command answers through an acknowledgement of this shape. */
export type Ack<T> = { data: T } | { error: { code: ErrorCode; message: string; reason?: ErrorReason; params?: ErrorParams; fieldIssues?: Record<string, FieldIssue> } };
/** The acknowledgement callback of a command. */
export type AckFn<T> = (answer: Ack<T>) => void;

/** Payload of `clock:ping`: the client's send time T1 (ms, its own clock). */
export const ClockPing = z.object({ t1: z.number().finite() });
/** Answer of `clock:ping`: T1 echoed, the server's receive time T2 and send time T3 (RFC 5905 §8). */
export interface ClockPong {
  t1: number;
  t2: number;
  t3: number;
}

/** Payloads of the live-session commands, parsed on the server with these schemas. */
export const LivePayloads = {
  watch: z.object({ sessionId: z.string().min(1).max(64) }),
  empty: z.object({}).strict(),
  goto: z.object({ index: z.number().int().min(0).max(500) }),
  adjust: z.object({ deltaMs: z.number().int().min(-3_600_000).max(3_600_000) }),
  lock: z.object({ locked: z.boolean() }),
  reveal: z.object({ revealed: z.boolean() }),
  message: z.object({ text: z.string().trim().min(1, 'Write a message first').max(200, 'Keep the message under 200 characters') }),
  shorten: z.object({
    cuts: z.array(z.object({ itemId: z.string().min(1).max(64), toMin: z.number().int().min(1).max(480) })).max(100),
  }),
  consent: z.object({ photoConsent: z.boolean() }),
  /** Payload of `session:projector-locale` and `participant:locale`. */
  locale: z.object({ locale: z.enum(LOCALES) }).strict(),
  /** Payload of `submission:list`. */
  submissionList: z.object({ itemId: z.string().min(1).max(64) }),
  /** Payload of `pages:show`: the page a projector shows of the view `key` (item and whether results show). */
  pagesShow: z
    .object({ key: z.string().max(100), page: z.number().int().min(0).max(998), pages: z.number().int().min(1).max(999) })
    .strict()
    .refine((p) => p.page < p.pages, { message: 'The page is not one of the pages', path: ['page'] }),
  /** Payload of `pages:turn`: one page on or back, on the view `key` the console saw. */
  pagesTurn: z.object({ key: z.string().max(100), step: z.union([z.literal(1), z.literal(-1)]) }).strict(),
};

/** The page a projector shows of a view that does not fit one screen (its pager's "2/5"). */
export type PagesShown = z.infer<typeof LivePayloads.pagesShow>;
/** A page turn the console asked for, to the projectors. */
export type PagesTurn = z.infer<typeof LivePayloads.pagesTurn>;

/**
 * Who may send a command: `any` (every socket, e.g. the clock's ping), `account` (a signed-in
 * facilitator or observer, before watching), `screen` (any screen attached to a session: a phone, a
 * projector, or an account watching it), `display` (a screen of the room that is not a phone: a
 * projector, or an account watching), `participant` (a phone that joined), `runner` (an owner or
 * co-facilitator watching the session, its account checked afresh on every command).
 */
export type CommandAccess = 'any' | 'account' | 'screen' | 'display' | 'participant' | 'runner';

/** One command's declaration: who may send it, its payload's schema, and (as a type only) its answer. */
export interface CommandDef<S extends z.ZodType = z.ZodType, A = unknown> {
  access: CommandAccess;
  payload: S;
  summary: string;
  /** Never set at run time: it carries the answer's type to the types derived from the table. */
  readonly answer?: { type: A };
}

/** Declares a command answering with `A`: `command<LiveState>()('runner', schema, 'what it does')`. */
function command<A>() {
  return <S extends z.ZodType>(access: CommandAccess, payload: S, summary: string): CommandDef<S, A> => ({ access, payload, summary });
}

const empty = LivePayloads.empty;
const item = ActivityPayloads.item;

/**
 * Every command a client sends (`entity:verb`), declared once: who may send it, its payload's zod
 * schema and its answer's type. The server's command registry (server/common/command.ts) authorises
 * and parses by it, `ClientToServerEvents` and the client's `ask` derive their types from it, and the
 * socket matrix test walks it.
 */
export const COMMANDS = {
  'clock:ping': command<ClockPong>()('any', ClockPing, "The server's receive and send times for the clock offset estimate (RFC 5905 §8)."),
  'session:watch': command<LiveState>()('account', LivePayloads.watch, "Facilitator or observer: join a session's rooms and get its state."),
  'session:sync': command<ScreenState>()('screen', empty, "Any screen: the current state again (after a reconnect); a phone gets a phone's state."),
  'session:next': command<LiveState>()('runner', empty, 'Go to the next agenda item.'),
  'session:back': command<LiveState>()('runner', empty, 'Go back to the previous agenda item.'),
  'session:goto': command<LiveState>()('runner', LivePayloads.goto, 'Go to an agenda item by its place.'),
  'timer:start': command<LiveState>()('runner', empty, "Start the current item's timer."),
  'timer:pause': command<LiveState>()('runner', empty, "Pause the current item's timer."),
  'timer:resume': command<LiveState>()('runner', empty, "Resume the current item's timer."),
  'timer:adjust': command<LiveState>()('runner', LivePayloads.adjust, "Add or take time from the current item's timer."),
  'session:lock': command<LiveState>()('runner', LivePayloads.lock, "Lock or unlock the phones' input."),
  'session:reveal': command<LiveState>()('runner', LivePayloads.reveal, 'Show or hide the results on the other screens.'),
  'session:message': command<LiveState>()('runner', LivePayloads.message, 'Send a short message to everyone in the session.'),
  'session:projector-locale': command<LiveState>()('runner', LivePayloads.locale, 'The language the projector shows this session in.'),
  'agenda:shorten': command<LiveState>()('runner', LivePayloads.shorten, 'Apply a shortening suggestion to the remaining items of this live run (the stored plan stays).'),
  'agenda:undo-cuts': command<LiveState>()('runner', empty, "Undo the last cut to this live run's timeboxes."),
  'agenda:keep-cuts': command<LiveState>()('runner', empty, "Write this live run's cut timeboxes into the stored plan."),
  'participants:list': command<ParticipantView[]>()('runner', empty, 'Who is in the room.'),
  'participant:me': command<Me>()('participant', empty, 'Phone: who am I (after a reload).'),
  'participant:consent': command<Me>()('participant', LivePayloads.consent, 'Phone: change photo consent.'),
  'participant:locale': command<Me>()('participant', LivePayloads.locale, 'Phone: the language the phone now shows (for the e-mail with the report).'),
  'submission:create': command<{ id: string; duplicate: boolean }>()('participant', SubmissionInput, 'Phone: submit a note; a repeated clientId answers with the first result.'),
  'submission:list': command<SubmissionView[]>()('runner', LivePayloads.submissionList, 'The submissions of an item so far.'),
  'teams:list': command<Team[]>()('screen', empty, "Any screen: the session's teams."),
  'teams:form': command<Team[]>()('runner', FormTeamsPayload, 'Split the room into teams as even as possible.'),
  'teams:set': command<Team[]>()('runner', SetTeamsPayload, 'Set the teams as decided (moves people, names challenges).'),
  'vote:state': command<VoteView>()('screen', empty, "Any screen: the current item's vote (a phone also gets its own ballot)."),
  'vote:setup': command<VoteView>()('runner', VoteSetupPayload, "Set the current item's vote up (options and rules) before it opens."),
  'vote:open': command<VoteView>()('runner', empty, "Open the current item's vote (again)."),
  'vote:close': command<VoteView>()('runner', empty, "Close the current item's vote; votes are final."),
  'vote:dot': command<BallotAnswer>()('participant', DotPayload, 'Phone: add or take back one dot; a repeated clientId is applied once.'),
  'vote:rank': command<BallotAnswer>()('participant', RankPayload, 'Phone: put the options in order; a repeated clientId is applied once.'),
  'vote:results': command<VoteResults>()('screen', empty, "The current vote's results: the facilitators' any time, other screens' once revealed."),
  'vote:choose': command<VoteView>()('runner', ChoosePayload, 'Carry the top N forward, with ties at the cut-off broken by the facilitator.'),
  'vote:sources': command<VoteSources>()('runner', empty, "What may become options: earlier notes and earlier votes' chosen options."),
  'teams:propose': command<TeamProposal>()('runner', ProposeTeamsPayload, "Cairn's teams from the current team sort, to adjust and confirm with `teams:confirm`."),
  'teams:confirm': command<Team[]>()('runner', SetTeamsPayload, "Confirm a team sort's teams (as adjusted): sets them, closes the vote and records the confirmation."),
  'activity:board': command<ActivityBoard>()('screen', item, "What an activity shows of an item (a phone: its own and its team's notes; others: the room's, no names, nothing hidden)."),
  'notes:list': command<ActivityBoard>()('runner', item, 'Every note of an item with names, hidden and merged ones, themes and promotions, to moderate.'),
  'notes:hide': command<NoteView[]>()('runner', ActivityPayloads.hide, 'Hide notes from the room, or show them again (the undo).'),
  'notes:merge': command<NoteView[]>()('runner', ActivityPayloads.merge, 'Merge duplicates under the note to keep.'),
  'notes:unmerge': command<NoteView[]>()('runner', ActivityPayloads.unmerge, 'A merged duplicate stands on its own again.'),
  'notes:promote': command<PromotedOption>()('runner', ActivityPayloads.promote, 'Make a note or a theme an option of a later vote (promoting twice answers with the first).'),
  'notes:unpromote': command<PromotedOption[]>()('runner', ActivityPayloads.unpromote, 'Take a promotion back.'),
  'notes:promoted': command<PromotedOption[]>()('screen', ActivityPayloads.promoted, 'Any screen: the notes and themes promoted to options of a later vote, in the order they were promoted (the whole session\'s, or one item\'s).'),
  'themes:create': command<ThemeView>()('runner', ActivityPayloads.themeCreate, 'A new affinity theme, with the notes dropped into it.'),
  'themes:apply': command<ThemeView[]>()('runner', ActivityPayloads.themeApply, 'Accept suggested themes (as the facilitator changed them).'),
  'themes:rename': command<ThemeView>()('runner', ActivityPayloads.themeRename, 'Rename a theme (its promotion, if any, follows).'),
  'themes:delete': command<{ id: string }>()('runner', ActivityPayloads.themeDelete, 'Remove a theme; its notes go back to the ungrouped ones.'),
  'themes:assign': command<NoteView[]>()('runner', ActivityPayloads.themeAssign, 'Move notes into a theme (`themeId: null` takes them out).'),
  'rounds:get': command<RoundView>()('screen', item, 'Any screen: the current round of an item run in rounds (rotating pairs, test rounds\' visits).'),
  'rounds:set': command<RoundView>()('runner', ActivityPayloads.roundSet, 'Go to a round, or draw the pairs again from whoever is online (`regroup`).'),
  'storyboard:reorder': command<string[]>()('participant', ActivityPayloads.reorder, "Phone: put the own team's storyboard frames in order."),
  'storyboard:arrange': command<string[]>()('runner', ActivityPayloads.arrange, "Put any storyboard's frames in order."),
  'pages:show': command<PagesShown>()('display', LivePayloads.pagesShow, 'Projector: which page of a paged view it shows (after every turn, by itself or asked), for the console.'),
  'pages:turn': command<PagesShown | null>()('runner', LivePayloads.pagesTurn, "Turn the projectors' page; answers with the page last shown (the projectors say the new one once turned)."),
  'pages:get': command<PagesShown | null>()('runner', empty, 'The page a projector said it shows last (null when none pages), for a console opened meanwhile.'),
} as const satisfies Record<string, CommandDef>;

/** A command's name. */
export type Command = keyof typeof COMMANDS;
/** What a client sends with a command (the schema's input). */
export type CommandPayload<E extends Command> = z.input<(typeof COMMANDS)[E]['payload']>;
/** What the server's handler receives once the payload is parsed (the schema's output). */
export type CommandInput<E extends Command> = z.output<(typeof COMMANDS)[E]['payload']>;
/** What a command's acknowledgement carries on success. */
export type CommandAnswer<E extends Command> = NonNullable<(typeof COMMANDS)[E]['answer']>['type'];

/** A command's payload argument: optional when the command's schema accepts an empty object. */
// eslint-disable-next-line @typescript-eslint/no-empty-object-type
export type CommandArgs<E extends Command> = {} extends CommandPayload<E> ? [payload?: CommandPayload<E>] : [payload: CommandPayload<E>];

/** Events a client sends to the server, derived from COMMANDS: each takes its payload and answers through its ack. */
export type ClientToServerEvents = { [E in Command]: (payload: CommandPayload<E>, ack: AckFn<CommandAnswer<E>>) => void };

/** Why an open console lost its rights: its account was signed out everywhere or disabled, or its role taken away. */
export type AccessRevokedReason = 'signed_out' | 'disabled' | 'removed' | 'demoted';

/** Events the server pushes to clients (`entity:verbed`). */
export interface ServerToClientEvents {
  /**
   * This account's rights changed while its screen was open: signed out or disabled (the socket is
   * then closed), removed from the workshop (it leaves the session's rooms) or no longer allowed to
   * run it (it leaves the facilitators' room).
   */
  'access:revoked': (payload: { reason: AccessRevokedReason; message: string }) => void;
  /** The session's state changed: the whole state to the console and projectors, a phone's state to the phones. */
  'session:updated': (state: ScreenState) => void;
  /** The facilitator sent a short message (to everyone in the session). */
  'session:messaged': (message: { id: string; text: string; sentAt: number }) => void;
  /** The session was stopped. */
  'session:ended': (payload: { reason: string }) => void;
  /** Who is in the room changed (facilitators only). */
  'participants:updated': (participants: ParticipantView[]) => void;
  /** A new submission (facilitators only). */
  'submission:created': (submission: SubmissionView) => void;
  /** The teams changed (to everyone in the session). */
  'teams:updated': (teams: Team[]) => void;
  /** The current vote's options or status changed (to everyone in the session; no tallies). */
  'vote:updated': (vote: VoteView) => void;
  /** New tallies (to facilitators; to the whole session once revealed), at most a few a second. */
  'vote:tallied': (results: VoteResults) => void;
  /** A participant's own ballot changed (to that participant's phones, so a second device follows). */
  'ballot:updated': (mine: MyBallot) => void;
  /** Something on an item's board changed (notes, themes, photos, frame order): fetch it again. Coalesced, a few a second at most. */
  'activity:changed': (payload: { itemId: string }) => void;
  /** A teammate's note on a team activity (to the team's room), so the team's phones show it as it comes. */
  'notes:added': (note: NoteView) => void;
  /** The round of an item changed (to everyone in the session). */
  'rounds:updated': (round: RoundView) => void;
  /** The session's promoted notes and themes changed (to the facilitators). */
  'promotions:updated': (options: PromotedOption[]) => void;
  /** A projector turned the page of a paged view (to the facilitators, so the console says "page 2 of 5"). */
  'pages:shown': (shown: PagesShown) => void;
  /** The console asked the projectors to turn the page (to the session's screens). */
  'pages:turned': (turn: PagesTurn) => void;
}

/** What the server remembers about each socket once it has authenticated. */
export interface SocketData {
  kind: 'user' | 'participant' | 'display';
  userId?: string;
  /** For users: the token version the socket signed in with; a change (password, sign out everywhere) ends it. */
  tokenVersion?: number;
  participantId?: string;
  sessionId?: string;
  /** For users: the session they watch and their role on its workshop. */
  watching?: { sessionId: string; workshopId: string; canRun: boolean };
}
