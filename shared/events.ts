import { z } from 'zod';
import type { ErrorCode } from './errors';
import type { LiveState, Me, ParticipantView, SubmissionView } from './schemas/live';
import type { FormTeamsPayload, SetTeamsPayload, Team } from './schemas/team';

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
};

/** Events a client sends to the server (commands are `entity:verb`; each answers through its ack). */
export interface ClientToServerEvents {
  'clock:ping': (payload: z.input<typeof ClockPing>, ack: AckFn<ClockPong>) => void;
  /** Facilitator or display screen: join a session's rooms and get its state. */
  'session:watch': (payload: z.input<typeof LivePayloads.watch>, ack: AckFn<LiveState>) => void;
  /** Any screen: the current state again (after a reconnect). */
  'session:sync': (payload: Record<string, never>, ack: AckFn<LiveState>) => void;
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
  /** Apply a shortening suggestion to the remaining items. */
  'agenda:shorten': (payload: z.input<typeof LivePayloads.shorten>, ack: AckFn<LiveState>) => void;
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
}

/** Events the server pushes to clients (`entity:verbed`). */
export interface ServerToClientEvents {
  /** The session's state changed (to everyone in the session). */
  'session:updated': (state: LiveState) => void;
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
}

/** What the server remembers about each socket once it has authenticated. */
export interface SocketData {
  kind: 'user' | 'participant' | 'display';
  userId?: string;
  participantId?: string;
  sessionId?: string;
  /** For users: the session they watch and their role on its workshop. */
  watching?: { sessionId: string; workshopId: string; canRun: boolean };
}
