import type { Socket } from 'socket.io';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import { AppError, errors } from '../../common/errors';
import { EDIT_ROLES } from '../../common/access';
import { liveRooms, type LiveService } from './live.service';
import { fieldErrors } from '../../../shared/errors';
import { SubmissionInput, phoneStateOf } from '../../../shared/schemas/live';
import {
  LivePayloads,
  type Ack,
  type AckFn,
  type ClientToServerEvents,
  type ServerToClientEvents,
  type SocketData,
} from '../../../shared/events';

/** A socket of the live session as the server sees it. */
export type LiveSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/**
 * Who may send a command: `participant` (a phone that joined), `screen` (any screen attached to a
 * session: a phone, a projector, or an account watching it), `runner` (an owner or co-facilitator
 * watching the session).
 */
export type Need = 'participant' | 'screen' | 'runner';

/** The caller of a command, once allowed. */
export interface Allowed {
  sessionId: string;
  participantId: string | null;
}

export type Command = Exclude<keyof ClientToServerEvents, 'clock:ping'>;
/** What a command's acknowledgement carries on success. */
export type AckData<E extends Command> = Parameters<ClientToServerEvents[E]>[1] extends AckFn<infer T> ? T : never;

/** Parses a payload with its schema; a refusal names each field in the acknowledgement's message. */
function parse<S extends z.ZodType>(schema: S, value: unknown): z.infer<S> {
  const r = schema.safeParse(value);
  if (r.success) return r.data;
  const message = Object.entries(fieldErrors(r.error))
    .map(([field, problem]) => (field === '_' ? problem : `${field}: ${problem}`))
    .join('; ');
  throw new AppError(400, 'validation_failed', message || 'The payload is not valid');
}

/** The commands each kind of socket may never run (filled as the first socket of the kind registers them). */
const REFUSED: Partial<Record<SocketData['kind'], Set<string>>> = {};

/** Registers a live command on one socket: authorise by need, run (which parses), answer through the ack. */
export type LiveOn = <E extends Command>(
  event: E,
  need: Need | null,
  run: (payload: unknown, who: Allowed) => Promise<AckData<E>>,
) => void;

/** What other features get to add their own commands to a live socket, with the same authorisation. */
export interface LiveCommands {
  on: LiveOn;
  /** Parses a payload with its schema or throws a `validation_failed` error. */
  parse: typeof parse;
}

/**
 * The live session's socket commands for one connection: phones are put in their session's and
 * team's rooms on connect, projectors in their session's; accounts attach with `session:watch`.
 * Every command is authorised by role, its payload parsed with zod, and answered through its ack.
 */
export function registerLiveSocket(socket: LiveSocket, ctx: AppContext, live: LiveService): LiveCommands {
  const data = socket.data;
  let participant: { id: string; sessionId: string } | null = null;
  let countedOnline = false;

  const ready = (async () => {
    if (data.kind === 'participant' && data.participantId && data.sessionId) {
      const p = await live.participantOf(data.participantId, data.sessionId);
      // A token whose participant is gone (data deleted, workshop removed) connects but joins nothing.
      if (!p || socket.disconnected) return;
      participant = { id: p.id, sessionId: p.sessionId };
      await socket.join([
        liveRooms.session(p.sessionId),
        liveRooms.participant(p.id),
        ...(p.teamId ? [liveRooms.team(p.teamId)] : []),
      ]);
      countedOnline = true;
      live.participantConnected(p.sessionId, p.id);
    } else if (data.kind === 'display' && data.sessionId) {
      await socket.join([liveRooms.session(data.sessionId), liveRooms.screens(data.sessionId)]);
    }
  })().catch((err: unknown) => ctx.logger.error({ err }, 'could not attach a live socket'));

  socket.on('disconnect', () => {
    void ready.then(() => {
      if (countedOnline && participant) live.participantDisconnected(participant.sessionId, participant.id);
      countedOnline = false;
    });
  });

  const allow = async (need: Need): Promise<Allowed> => {
    await ready;
    if (need === 'participant' || (need === 'screen' && data.kind === 'participant')) {
      if (!participant) throw errors.forbidden(data.kind === 'participant' ? 'Join the session again' : 'Only participants can do that');
      return { sessionId: participant.sessionId, participantId: participant.id };
    }
    if (need === 'screen') {
      if (data.kind === 'display' && data.sessionId) return { sessionId: data.sessionId, participantId: null };
      if (data.kind === 'user' && data.watching) return { sessionId: data.watching.sessionId, participantId: null };
      throw errors.forbidden('Watch a session first');
    }
    if (data.kind !== 'user' || !data.watching || !data.userId) throw errors.forbidden('Only the facilitators can run the session');
    // Checked afresh on every command, so a co-facilitator removed during the day stops at once.
    const { sessionId, workshopId } = data.watching;
    const role = await ctx.accountRoleOf(data.userId, workshopId);
    const canRun = role !== null && EDIT_ROLES.includes(role);
    data.watching.canRun = canRun;
    if (!canRun) {
      await socket.leave(liveRooms.facilitators(sessionId));
      throw errors.forbidden('Only the facilitators can run the session');
    }
    return { sessionId, participantId: null };
  };

  /** Registers a command: authorise, then run (which parses), then answer through the ack. */
  // Commands this socket's kind may never run, answered by one listener instead of one each. The set
  // is the same for every socket of a kind, so they share it.
  const refused = (REFUSED[data.kind] ??= new Set<string>());
  socket.onAny((event: string, ...args: unknown[]) => {
    if (!refused.has(event)) return;
    const ack = args[args.length - 1];
    if (typeof ack === 'function') {
      (ack as (a: unknown) => void)({
        error: { code: 'forbidden', message: data.kind === 'participant' ? 'Only the facilitators can do that' : 'Only participants can do that' },
      });
    }
  });
  const on: LiveOn = <E extends Command>(event: E, need: Need | null, run: (payload: unknown, who: Allowed) => Promise<AckData<E>>) => {
    // A phone or a projector can never run a facilitator's command, nor a projector a phone's: such
    // sockets do not carry those handlers at all (a room of phones is most of the server's memory);
    // the catch-all below answers `forbidden` for them.
    if ((need === 'runner' && data.kind !== 'user') || (need === 'participant' && data.kind !== 'participant')) {
      refused.add(event);
      return;
    }
    // The typed `on` cannot take a generic event name; the handler's own types come from AckData.
    (socket as unknown as { on(ev: string, fn: (...args: unknown[]) => void): void }).on(event, (...args: unknown[]) => {
      let [payload, ack] = args;
      // A command sent with only an acknowledgement gets an empty payload.
      if (typeof payload === 'function' && ack === undefined) [payload, ack] = [{}, payload];
      const reply = (answer: Ack<AckData<E>>) => {
        if (typeof ack === 'function') (ack as AckFn<AckData<E>>)(answer);
      };
      void (async () => {
        try {
          const who = need === null ? { sessionId: '', participantId: null } : await allow(need);
          reply({ data: await run(payload, who) });
        } catch (err) {
          if (err instanceof AppError) reply({ error: { code: err.code, message: err.message } });
          else {
            ctx.logger.error({ err, event }, 'live command failed');
            reply({ error: { code: 'internal', message: 'Something went wrong on the server' } });
          }
        }
      })();
    });
  };
  const empty = (payload: unknown) => parse(LivePayloads.empty, payload ?? {});

  on('session:watch', null, async (payload) => {
    await ready;
    if (data.kind !== 'user' || !data.userId) throw errors.forbidden('Only facilitators and observers watch a session from an account');
    const { sessionId } = parse(LivePayloads.watch, payload);
    const workshopId = await live.workshopOf(sessionId);
    const role = await ctx.accountRoleOf(data.userId, workshopId);
    if (!role) throw errors.forbidden('You have no role on this workshop');
    const before = data.watching?.sessionId;
    if (before && before !== sessionId) {
      for (const room of [liveRooms.session(before), liveRooms.screens(before), liveRooms.facilitators(before)]) await socket.leave(room);
    }
    const canRun = EDIT_ROLES.includes(role);
    await socket.join([liveRooms.session(sessionId), liveRooms.screens(sessionId), ...(canRun ? [liveRooms.facilitators(sessionId)] : [])]);
    if (!canRun) await socket.leave(liveRooms.facilitators(sessionId));
    data.watching = { sessionId, workshopId, canRun };
    return live.state(sessionId);
  });

  on('session:sync', 'screen', async (payload, who) => {
    empty(payload);
    const state = await live.state(who.sessionId);
    return who.participantId ? phoneStateOf(state) : state;
  });
  on('session:next', 'runner', async (payload, who) => {
    empty(payload);
    return live.next(who.sessionId);
  });
  on('session:back', 'runner', async (payload, who) => {
    empty(payload);
    return live.back(who.sessionId);
  });
  on('session:goto', 'runner', async (payload, who) => live.goto(who.sessionId, parse(LivePayloads.goto, payload).index));
  on('timer:start', 'runner', async (payload, who) => {
    empty(payload);
    return live.timerStart(who.sessionId);
  });
  on('timer:pause', 'runner', async (payload, who) => {
    empty(payload);
    return live.timerPause(who.sessionId);
  });
  on('timer:resume', 'runner', async (payload, who) => {
    empty(payload);
    return live.timerResume(who.sessionId);
  });
  on('timer:adjust', 'runner', async (payload, who) => live.timerAdjust(who.sessionId, parse(LivePayloads.adjust, payload).deltaMs));
  on('session:lock', 'runner', async (payload, who) => live.setLocked(who.sessionId, parse(LivePayloads.lock, payload).locked));
  on('session:reveal', 'runner', async (payload, who) => live.setRevealed(who.sessionId, parse(LivePayloads.reveal, payload).revealed));
  on('session:message', 'runner', async (payload, who) => live.sendMessage(who.sessionId, parse(LivePayloads.message, payload).text));
  on('agenda:shorten', 'runner', async (payload, who) => live.shorten(who.sessionId, parse(LivePayloads.shorten, payload).cuts));
  on('agenda:undo-cuts', 'runner', async (payload, who) => {
    empty(payload);
    return live.undoCuts(who.sessionId);
  });
  on('agenda:keep-cuts', 'runner', async (payload, who) => {
    empty(payload);
    return live.keepCuts(who.sessionId);
  });
  on('participants:list', 'runner', async (payload, who) => {
    empty(payload);
    return live.participants(who.sessionId);
  });
  on('submission:list', 'runner', async (payload, who) =>
    live.listSubmissions(who.sessionId, parse(LivePayloads.submissionList, payload).itemId),
  );
  on('participant:me', 'participant', async (payload, who) => {
    empty(payload);
    return live.me(who.participantId!, who.sessionId);
  });
  on('participant:consent', 'participant', async (payload, who) =>
    live.setConsent(who.participantId!, who.sessionId, parse(LivePayloads.consent, payload).photoConsent),
  );
  on('submission:create', 'participant', async (payload, who) =>
    live.createSubmission(who.participantId!, who.sessionId, parse(SubmissionInput, payload)),
  );
  return { on, parse };
}
