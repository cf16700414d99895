import { z } from 'zod';
import type { ErrorCode } from './errors';
import type { LiveState, Me, ParticipantView, ScreenState, SubmissionView } from './schemas/live';
import type { FormTeamsPayload, SetTeamsPayload, Team } from './schemas/team';
import type {
  BallotAnswer,
  ChoosePayload,
  DotPayload,
  MyBallot,
  ProposeTeamsPayload,
  RankPayload,
  TeamProposal,
  VoteResults,
  VoteSetupPayload,
  VoteSources,
  VoteView,
} from './schemas/voting';
import type { ActivityBoard, ActivityPayloads, PromotedOption, NoteView, RoundView, ThemeView } from './schemas/activities';

/** Every socket command answers through an acknowledgement of this shape. */
export type Ack<T> = { data: T } | { error: { code: ErrorCode; message: string } };
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

/** Events a client sends to the server (commands are `entity:verb`; each answers through its ack). */
export interface ClientToServerEvents {
  'clock:ping': (payload: z.input<typeof ClockPing>, ack: AckFn<ClockPong>) => void;
  /** Facilitator or display screen: join a session's rooms and get its state. */
  'session:watch': (payload: z.input<typeof LivePayloads.watch>, ack: AckFn<LiveState>) => void;
  /** Any screen: the current state again (after a reconnect); a phone gets a phone's state (no counts, no runs). */
  'session:sync': (payload: Record<string, never>, ack: AckFn<ScreenState>) => void;
  'session:next': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  'session:back': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  'session:goto': (payload: z.input<typeof LivePayloads.goto>, ack: AckFn<LiveState>) => void;
  'timer:start': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  'timer:pause': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  'timer:resume': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  'timer:adjust': (payload: z.input<typeof LivePayloads.adjust>, ack: AckFn<LiveState>) => void;
  'session:lock': (payload: z.input<typeof LivePayloads.lock>, ack: AckFn<LiveState>) => void;
  'session:reveal': (payload: z.input<typeof LivePayloads.reveal>, ack: AckFn<LiveState>) => void;
  'session:message': (payload: z.input<typeof LivePayloads.message>, ack: AckFn<LiveState>) => void;
  /** Apply a shortening suggestion to the remaining items of this live run (the stored plan stays). */
  'agenda:shorten': (payload: z.input<typeof LivePayloads.shorten>, ack: AckFn<LiveState>) => void;
  /** Undo the last cut to this live run's timeboxes. */
  'agenda:undo-cuts': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  /** Write this live run's cut timeboxes into the stored plan. */
  'agenda:keep-cuts': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
  /** Console: who is in the room. */
  'participants:list': (payload: Record<string, never>, ack: AckFn<ParticipantView[]>) => void;
  /** Phone: who am I (after a reload). */
  'participant:me': (payload: Record<string, never>, ack: AckFn<Me>) => void;
  /** Phone: change photo consent. */
  'participant:consent': (payload: z.input<typeof LivePayloads.consent>, ack: AckFn<Me>) => void;
  /** Phone: submit a note; a repeated clientId answers with the first result. */
  'submission:create': (payload: unknown, ack: AckFn<{ id: string; duplicate: boolean }>) => void;
  /** Console: the submissions of an item so far. */
  'submission:list': (payload: { itemId: string }, ack: AckFn<SubmissionView[]>) => void;
  /** Any screen: the session's teams. */
  'teams:list': (payload: Record<string, never>, ack: AckFn<Team[]>) => void;
  /** Console: split the room into teams as even as possible. */
  'teams:form': (payload: z.input<typeof FormTeamsPayload>, ack: AckFn<Team[]>) => void;
  /** Console: set the teams as decided (moves people, names challenges). */
  'teams:set': (payload: z.input<typeof SetTeamsPayload>, ack: AckFn<Team[]>) => void;
  /** Any screen: the current item's vote (a phone also gets its own ballot). */
  'vote:state': (payload: Record<string, never>, ack: AckFn<VoteView>) => void;
  /** Console: set the current item's vote up (options and rules) before it opens. */
  'vote:setup': (payload: z.input<typeof VoteSetupPayload>, ack: AckFn<VoteView>) => void;
  /** Console: open the current item's vote (again). */
  'vote:open': (payload: Record<string, never>, ack: AckFn<VoteView>) => void;
  /** Console: close the current item's vote; votes are final. */
  'vote:close': (payload: Record<string, never>, ack: AckFn<VoteView>) => void;
  /** Phone: add or take back one dot; a repeated clientId is applied once. */
  'vote:dot': (payload: z.input<typeof DotPayload>, ack: AckFn<BallotAnswer>) => void;
  /** Phone: put the options in order; a repeated clientId is applied once. */
  'vote:rank': (payload: z.input<typeof RankPayload>, ack: AckFn<BallotAnswer>) => void;
  /** Console any time, other screens once revealed: the current vote's results. */
  'vote:results': (payload: Record<string, never>, ack: AckFn<VoteResults>) => void;
  /** Console: carry the top N forward, with ties at the cut-off broken by the facilitator. */
  'vote:choose': (payload: z.input<typeof ChoosePayload>, ack: AckFn<VoteView>) => void;
  /** Console: what may become options: earlier notes and earlier votes' chosen options. */
  'vote:sources': (payload: Record<string, never>, ack: AckFn<VoteSources>) => void;
  /** Console: Cairn's teams from the current team sort, to adjust and confirm with `teams:set`. */
  'teams:propose': (payload: z.input<typeof ProposeTeamsPayload>, ack: AckFn<TeamProposal>) => void;
  /** Console: confirm a team sort's teams (as adjusted): sets them, closes the vote and records the confirmation. */
  'teams:confirm': (payload: z.input<typeof SetTeamsPayload>, ack: AckFn<Team[]>) => void;
  /** Any screen: what an activity shows of an item (a phone: its own and its team's notes; others: the room's, no names, nothing hidden). */
  'activity:board': (payload: z.input<typeof ActivityPayloads.item>, ack: AckFn<ActivityBoard>) => void;
  /** Console: every note of an item with names, hidden and merged ones, themes and promotions, to moderate. */
  'notes:list': (payload: z.input<typeof ActivityPayloads.item>, ack: AckFn<ActivityBoard>) => void;
  /** Console: hide notes from the room, or show them again (the undo). */
  'notes:hide': (payload: z.input<typeof ActivityPayloads.hide>, ack: AckFn<NoteView[]>) => void;
  /** Console: merge duplicates under the note to keep. */
  'notes:merge': (payload: z.input<typeof ActivityPayloads.merge>, ack: AckFn<NoteView[]>) => void;
  /** Console: a merged duplicate stands on its own again. */
  'notes:unmerge': (payload: z.input<typeof ActivityPayloads.unmerge>, ack: AckFn<NoteView[]>) => void;
  /** Console: make a note or a theme an option of a later vote (promoting twice answers with the first). */
  'notes:promote': (payload: z.input<typeof ActivityPayloads.promote>, ack: AckFn<PromotedOption>) => void;
  /** Console: take a promotion back. */
  'notes:unpromote': (payload: z.input<typeof ActivityPayloads.unpromote>, ack: AckFn<PromotedOption[]>) => void;
  /**
   * Any screen: the notes and themes promoted to options of a later vote, in the order they were
   * promoted (the whole session's, or one item's): `{ id, text, sourceKind: 'note' | 'theme', sourceId, itemId }[]`.
   */
  'notes:promoted': (payload: z.input<typeof ActivityPayloads.promoted>, ack: AckFn<PromotedOption[]>) => void;
  /** Console: a new affinity theme, with the notes dropped into it. */
  'themes:create': (payload: z.input<typeof ActivityPayloads.themeCreate>, ack: AckFn<ThemeView>) => void;
  /** Console: accept suggested themes (as the facilitator changed them). */
  'themes:apply': (payload: z.input<typeof ActivityPayloads.themeApply>, ack: AckFn<ThemeView[]>) => void;
  /** Console: rename a theme (its promotion, if any, follows). */
  'themes:rename': (payload: z.input<typeof ActivityPayloads.themeRename>, ack: AckFn<ThemeView>) => void;
  /** Console: remove a theme; its notes go back to the ungrouped ones. */
  'themes:delete': (payload: z.input<typeof ActivityPayloads.themeDelete>, ack: AckFn<{ id: string }>) => void;
  /** Console: move notes into a theme (`themeId: null` takes them out). */
  'themes:assign': (payload: z.input<typeof ActivityPayloads.themeAssign>, ack: AckFn<NoteView[]>) => void;
  /** Any screen: the current round of an item run in rounds (rotating pairs, test rounds' visits). */
  'rounds:get': (payload: z.input<typeof ActivityPayloads.item>, ack: AckFn<RoundView>) => void;
  /** Console: go to a round, or draw the pairs again from whoever is online (`regroup`). */
  'rounds:set': (payload: z.input<typeof ActivityPayloads.roundSet>, ack: AckFn<RoundView>) => void;
  /** Phone: put the own team's storyboard frames in order. */
  'storyboard:reorder': (payload: z.input<typeof ActivityPayloads.reorder>, ack: AckFn<string[]>) => void;
  /** Console: put any storyboard's frames in order. */
  'storyboard:arrange': (payload: z.input<typeof ActivityPayloads.arrange>, ack: AckFn<string[]>) => void;
  /** Projector: which page of a paged view it shows (after every turn, by itself or asked), for the console. */
  'pages:show': (payload: z.input<typeof LivePayloads.pagesShow>, ack: AckFn<PagesShown>) => void;
  /** Console: turn the projectors' page; answers with the page last shown (the projectors say the new one once turned). */
  'pages:turn': (payload: z.input<typeof LivePayloads.pagesTurn>, ack: AckFn<PagesShown | null>) => void;
  /** Console: the page a projector said it shows last (null when none pages), for a console opened meanwhile. */
  'pages:get': (payload: Record<string, never>, ack: AckFn<PagesShown | null>) => void;
}

/** A live-session command: every client-to-server event but the clock's ping, which any socket may send. */
export type Command = Exclude<keyof ClientToServerEvents, 'clock:ping'>;

/**
 * Who may send a command: `account` (a signed-in facilitator or observer, before watching),
 * `screen` (any screen attached to a session: a phone, a projector, or an account watching it),
 * `display` (a screen of the room that is not a phone: a projector, or an account watching),
 * `participant` (a phone that joined), `runner` (an owner or co-facilitator watching the session,
 * checked afresh on every command).
 */
export type CommandAccess = 'account' | 'screen' | 'display' | 'participant' | 'runner';

/**
 * Who may send each live command: the one declaration the server's socket registry authorises by
 * and the socket matrix test walks. Listing every command is checked by the compiler.
 */
export const COMMAND_ACCESS = {
  'session:watch': 'account',
  'session:sync': 'screen',
  'session:next': 'runner',
  'session:back': 'runner',
  'session:goto': 'runner',
  'timer:start': 'runner',
  'timer:pause': 'runner',
  'timer:resume': 'runner',
  'timer:adjust': 'runner',
  'session:lock': 'runner',
  'session:reveal': 'runner',
  'session:message': 'runner',
  'agenda:shorten': 'runner',
  'agenda:undo-cuts': 'runner',
  'agenda:keep-cuts': 'runner',
  'participants:list': 'runner',
  'participant:me': 'participant',
  'participant:consent': 'participant',
  'submission:create': 'participant',
  'submission:list': 'runner',
  'teams:list': 'screen',
  'teams:form': 'runner',
  'teams:set': 'runner',
  'vote:state': 'screen',
  'vote:setup': 'runner',
  'vote:open': 'runner',
  'vote:close': 'runner',
  'vote:dot': 'participant',
  'vote:rank': 'participant',
  'vote:results': 'screen',
  'vote:choose': 'runner',
  'vote:sources': 'runner',
  'teams:propose': 'runner',
  'teams:confirm': 'runner',
  'activity:board': 'screen',
  'notes:list': 'runner',
  'notes:hide': 'runner',
  'notes:merge': 'runner',
  'notes:unmerge': 'runner',
  'notes:promote': 'runner',
  'notes:unpromote': 'runner',
  'notes:promoted': 'screen',
  'themes:create': 'runner',
  'themes:apply': 'runner',
  'themes:rename': 'runner',
  'themes:delete': 'runner',
  'themes:assign': 'runner',
  'rounds:get': 'screen',
  'rounds:set': 'runner',
  'storyboard:reorder': 'participant',
  'storyboard:arrange': 'runner',
  'pages:show': 'display',
  'pages:turn': 'runner',
  'pages:get': 'runner',
} as const satisfies Record<Command, CommandAccess>;

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
