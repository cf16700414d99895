import type { Socket } from 'socket.io';
import { ZodObject, type z } from 'zod';
import { AppError, because, errors } from './errors';
import type { Logger } from 'pino';
import { fieldErrors, fieldIssues } from '../../shared/errors';
import {
  COMMANDS,
  type Ack,
  type ClientToServerEvents,
  type Command,
  type CommandAccess,
  type CommandAnswer,
  type CommandInput,
  type ServerToClientEvents,
  type SocketData,
} from '../../shared/events';

/** A socket as the server sees it. */
export type CommandSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** Who sent a command, once allowed: the session it acts on, and the participant for a phone. */
export interface Sender {
  sessionId: string;
  participantId: string | null;
}

/** What a command's handler receives: the parsed payload, the sender and its socket. */
export interface CommandContext<E extends Command> {
  payload: CommandInput<E>;
  who: Sender;
  socket: CommandSocket;
}

/** A command's handler: the answer it returns goes back through the acknowledgement. */
export type CommandHandler<E extends Command> = (ctx: CommandContext<E>) => Promise<CommandAnswer<E>> | CommandAnswer<E>;

/** A phone's place in its session, found when its socket connected. */
export interface JoinedParticipant {
  id: string;
  sessionId: string;
}

/**
 * What the registry asks the live session about a socket: it puts a new socket in its rooms (and
 * tells which participant a phone stands for, or `null` when it is no longer in its session), and
 * checks an account's socket against the account as it is now (disabled, removed, token version).
 */
export interface SocketSessions {
  attach(socket: CommandSocket): Promise<JoinedParticipant | null>;
  recheck(socket: CommandSocket): Promise<{ watching: boolean; canRun: boolean }>;
}

/** A command's entry in the registry's list of itself. */
export interface CommandMeta {
  event: Command;
  access: CommandAccess;
  summary: string;
  handled: boolean;
}

/** Parses a command's payload with its schema; a refusal names each field in the acknowledgement's message. */
export function parsePayload<S extends z.ZodType>(event: string, schema: S, value: unknown): z.infer<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  if ((typeof value !== 'object' || value === null || Array.isArray(value)) && schema instanceof ZodObject) {
    const fields = Object.keys(schema.shape as object);
    throw new AppError(400, 'validation_failed', `${event} needs an object${fields.length ? ` with ${fields.join(', ')}` : ''}`, undefined, because('payload_invalid', { field: '_' }));
  }
  return refuseFields(r.error);
}

/**
 * Refuses a socket payload (or a phone's fields) its schema did not take: the English message names each field
 * for logs and API clients; the reason names the first field's dotted path (`_` for the payload as a whole) and
 * `fieldIssues` carry each field's code and limits, for the phone and the console to word in their language.
 */
export function refuseFields(error: z.ZodError): never {
  const message = Object.entries(fieldErrors(error))
    .map(([field, problem]) => (field === '_' ? problem : `${field}: ${problem}`))
    .join('; ');
  const issues = fieldIssues(error);
  const field = Object.keys(issues)[0] ?? '_';
  throw new AppError(400, 'validation_failed', message || 'The payload is not valid', undefined, { ...because('payload_invalid', { field }), fieldIssues: issues });
}

/** Whether a kind of socket may ever send a command of this access (the rest get one shared refusal). */
function mayEverSend(kind: SocketData['kind'], access: CommandAccess): boolean {
  if (access === 'runner') return kind === 'user';
  if (access === 'participant') return kind === 'participant';
  if (access === 'display') return kind !== 'participant';
  return true;
}

/**
 * Cairn's socket commands, the counterpart of the REST registry (`route.ts`): each command of the
 * table in shared/events.ts gets one handler; on every socket the registry authorises the command
 * by its declared access, parses its payload with the declared schema before the handler, and
 * answers through the acknowledgement `{ data } | { error }`.
 */
export class SocketCommands {
  private handlers = new Map<Command, CommandHandler<Command>>();
  /** Per kind of socket: the listener of each command it may send (shared by every socket of the kind). */
  private listeners = new Map<SocketData['kind'], [Command, (...args: unknown[]) => void][]>();
  /** The participant each phone's socket stands for, once attached (its rooms joined). */
  private attached = new WeakMap<CommandSocket, Promise<JoinedParticipant | null>>();

  constructor(
    private sessions: SocketSessions,
    private logger: Logger,
  ) {}

  /** Declares the handler of a command; its access and payload come from the table. */
  add<E extends Command>(event: E, handler: CommandHandler<E>): void {
    if (this.handlers.has(event)) throw new Error(`${event} has a handler already`);
    this.handlers.set(event, handler as unknown as CommandHandler<Command>);
    this.listeners.clear();
  }

  /** Every declared command, its access and whether a handler serves it. */
  list(): CommandMeta[] {
    return (Object.keys(COMMANDS) as Command[]).map((event) => ({
      event,
      access: COMMANDS[event].access,
      summary: COMMANDS[event].summary,
      handled: this.handlers.has(event),
    }));
  }

  /** Attaches a new socket to its session and listens to every command its kind may send. */
  attach(socket: CommandSocket): void {
    const ready = this.sessions.attach(socket).catch((err: unknown) => {
      this.logger.error({ err }, 'could not attach a live socket');
      return null;
    });
    this.attached.set(socket, ready);
    // One listener a command, shared by every socket of a kind (a room of phones is most of the
    // server's memory); socket.io calls each with the socket as `this`.
    for (const [event, listener] of this.listenersOf(socket.data.kind)) {
      (socket as unknown as { on(ev: string, fn: (...args: unknown[]) => void): void }).on(event, listener);
    }
    socket.onAny(refuse);
  }

  private listenersOf(kind: SocketData['kind']): [Command, (...args: unknown[]) => void][] {
    let list = this.listeners.get(kind);
    if (list) return list;
    list = [];
    for (const [event, handler] of this.handlers) {
      if (!mayEverSend(kind, COMMANDS[event].access)) continue;
      // eslint-disable-next-line @typescript-eslint/no-this-alias
      const registry = this;
      list.push([
        event,
        function (this: CommandSocket, ...args: unknown[]) {
          registry.run(this, event, handler, args);
        },
      ]);
    }
    this.listeners.set(kind, list);
    return list;
  }

  // Every command of every phone passes here: no closures made per command (a room's burst of votes
  // is thousands a second), the answer and the failure are methods.
  private run(socket: CommandSocket, event: Command, handler: CommandHandler<Command>, args: unknown[]): void {
    let [payload, ack] = args;
    // A command sent with only an acknowledgement gets an empty payload.
    if (typeof payload === 'function' && ack === undefined) [payload, ack] = [{}, payload];
    const def = COMMANDS[event];
    if (def.access === 'any') {
      // Answered at once, without waiting for the socket's rooms: the clock's ping measures the server's own time.
      try {
        const answer = handler({ payload: parsePayload(event, def.payload, payload ?? {}) as never, who: { sessionId: '', participantId: null }, socket });
        Promise.resolve(answer).then(
          (data) => reply(ack, { data }),
          (err: unknown) => this.fail(event, ack, err),
        );
      } catch (err) {
        this.fail(event, ack, err);
      }
      return;
    }
    void this.runAllowed(socket, event, handler, def.access, payload, ack);
  }

  private async runAllowed(socket: CommandSocket, event: Command, handler: CommandHandler<Command>, access: Exclude<CommandAccess, 'any'>, payload: unknown, ack: unknown): Promise<void> {
    try {
      const who = await this.allow(socket, access);
      const parsed = parsePayload(event, COMMANDS[event].payload, payload ?? {});
      reply(ack, { data: await handler({ payload: parsed as never, who, socket }) });
    } catch (err) {
      this.fail(event, ack, err);
    }
  }

  /** Answers a failed command: an AppError with its code (and reason), anything else as `internal`, logged. */
  private fail(event: Command, ack: unknown, err: unknown): void {
    if (err instanceof AppError) {
      const { reason, params, fieldIssues: issues } = err.detail ?? {};
      reply(ack, { error: { code: err.code, message: err.message, ...(reason ? { reason } : {}), ...(params ? { params } : {}), ...(issues ? { fieldIssues: issues } : {}) } });
    } else {
      this.logger.error({ err, event }, 'socket command failed');
      reply(ack, { error: { code: 'internal', message: 'Something went wrong on the server' } });
    }
  }

  /** Authorises a command by its declared access; throws `forbidden` with the reason. */
  private async allow(socket: CommandSocket, declared: Exclude<CommandAccess, 'any'>): Promise<Sender> {
    const data = socket.data;
    const participant = await this.attached.get(socket);
    // A display command is a screen command that phones never send.
    if (declared === 'display' && data.kind === 'participant') throw errors.forbidden('Only the room’s screens can do that');
    const need = declared === 'display' ? 'screen' : declared;
    if (need === 'account') {
      if (data.kind !== 'user' || !data.userId) throw errors.forbidden('Only facilitators and observers watch a session from an account');
      return { sessionId: '', participantId: null };
    }
    if (need === 'participant' || (need === 'screen' && data.kind === 'participant')) {
      if (!participant) throw data.kind === 'participant' ? errors.forbidden('Join the session again', because('not_in_session')) : errors.forbidden('Only participants can do that');
      return { sessionId: participant.sessionId, participantId: participant.id };
    }
    if (need === 'screen' && data.kind === 'display') {
      if (data.sessionId) return { sessionId: data.sessionId, participantId: null };
      throw errors.forbidden('Watch a session first', because('watch_first'));
    }
    if (need === 'screen' && data.kind === 'user') {
      if (!data.watching) throw errors.forbidden('Watch a session first', because('watch_first'));
      // An account's rights are checked afresh on every command (removed, disabled, signed out elsewhere).
      if (!(await this.sessions.recheck(socket)).watching) throw errors.forbidden('You have no role on this workshop any more', because('no_role_any_more'));
      return { sessionId: data.watching.sessionId, participantId: null };
    }
    if (data.kind !== 'user' || !data.watching || !data.userId) throw errors.forbidden('Only the facilitators can run the session', because('runners_only'));
    // Checked afresh on every command, so a co-facilitator removed during the day stops at once.
    const { sessionId } = data.watching;
    if (!(await this.sessions.recheck(socket)).canRun) throw errors.forbidden('Only the facilitators can run the session', because('runners_only'));
    return { sessionId, participantId: null };
  }
}

/** Answers through a command's acknowledgement, when the sender asked for one. */
function reply(ack: unknown, answer: Ack<unknown>): void {
  if (typeof ack === 'function') (ack as (a: Ack<unknown>) => void)(answer);
}

/** Answers `forbidden` to a command the socket's kind may never send (it carries no listener for it). */
function refuse(this: CommandSocket, event: string, ...args: unknown[]): void {
  if (!Object.hasOwn(COMMANDS, event)) return;
  const def = COMMANDS[event as Command];
  if (mayEverSend(this.data.kind, def.access)) return;
  const ack = args[args.length - 1];
  if (typeof ack === 'function') {
    (ack as (a: unknown) => void)({
      error: { code: 'forbidden', message: this.data.kind === 'participant' ? 'Only the facilitators can do that' : 'Only participants can do that' },
    });
  }
}
