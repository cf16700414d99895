import type { Socket } from 'socket.io';
import type { z } from 'zod';
import type { AppContext } from '../../context';
import { AppError, errors } from '../../common/errors';
import { EDIT_ROLES } from '../../common/access';
import { liveRooms, type LiveIo, type LiveService } from './live.service';
import type { Transaction } from 'sequelize';
import type { MembershipRow, UserRow } from '../../db/models';
import { fieldErrors } from '../../../shared/errors';
import { SubmissionInput, phoneStateOf } from '../../../shared/schemas/live';
import {
  COMMAND_ACCESS,
  LivePayloads,
  type AccessRevokedReason,
  type Command,
  type CommandAccess,
  type Ack,
  type AckFn,
  type ClientToServerEvents,
  type ServerToClientEvents,
  type SocketData,
} from '../../../shared/events';

/** A socket of the live session as the server sees it. */
export type LiveSocket = Socket<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** Who may send a command (see COMMAND_ACCESS in shared/events.ts). */
export type Need = CommandAccess;

/** The caller of a command, once allowed. */
export interface Allowed {
  sessionId: string;
  participantId: string | null;
}

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

/** Registers a live command on one socket: authorise by its COMMAND_ACCESS, run (which parses), answer through the ack. */
export type LiveOn = <E extends Command>(event: E, run: (payload: unknown, who: Allowed) => Promise<AckData<E>>) => void;

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
    } else if (data.kind === 'user' && data.userId) {
      await socket.join(liveRooms.account(data.userId));
    }
  })().catch((err: unknown) => ctx.logger.error({ err }, 'could not attach a live socket'));

  socket.on('disconnect', () => {
    void ready.then(() => {
      if (countedOnline && participant) live.participantDisconnected(participant.sessionId, participant.id);
      countedOnline = false;
    });
  });

  const allow = async (declared: Need): Promise<Allowed> => {
    await ready;
    // A display command is a screen command that phones never send.
    if (declared === 'display' && data.kind === 'participant') throw errors.forbidden('Only the room’s screens can do that');
    const need = declared === 'display' ? 'screen' : declared;
    if (need === 'participant' || (need === 'screen' && data.kind === 'participant')) {
      if (!participant) throw errors.forbidden(data.kind === 'participant' ? 'Join the session again' : 'Only participants can do that');
      return { sessionId: participant.sessionId, participantId: participant.id };
    }
    if (need === 'screen' && data.kind === 'display') {
      if (data.sessionId) return { sessionId: data.sessionId, participantId: null };
      throw errors.forbidden('Watch a session first');
    }
    if (need === 'screen' && data.kind === 'user') {
      if (!data.watching) throw errors.forbidden('Watch a session first');
      // An account's rights are checked afresh on every command (removed, disabled, signed out elsewhere).
      if (!(await recheckAccountSocket(socket, ctx)).watching) throw errors.forbidden('You have no role on this workshop any more');
      return { sessionId: data.watching.sessionId, participantId: null };
    }
    if (data.kind !== 'user' || !data.watching || !data.userId) throw errors.forbidden('Only the facilitators can run the session');
    // Checked afresh on every command, so a co-facilitator removed during the day stops at once.
    const { sessionId } = data.watching;
    if (!(await recheckAccountSocket(socket, ctx)).canRun) throw errors.forbidden('Only the facilitators can run the session');
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
  const on: LiveOn = <E extends Command>(event: E, run: (payload: unknown, who: Allowed) => Promise<AckData<E>>) => {
    const need: Need = COMMAND_ACCESS[event];
    // A phone or a projector can never run a facilitator's command, nor a projector a phone's: such
    // sockets do not carry those handlers at all (a room of phones is most of the server's memory);
    // the catch-all below answers `forbidden` for them.
    if ((need === 'runner' && data.kind !== 'user') || (need === 'participant' && data.kind !== 'participant') || (need === 'display' && data.kind === 'participant')) {
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
          const who = need === 'account' ? { sessionId: '', participantId: null } : await allow(need);
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

  on('session:watch', async (payload) => {
    await ready;
    if (data.kind !== 'user' || !data.userId) throw errors.forbidden('Only facilitators and observers watch a session from an account');
    const { sessionId } = parse(LivePayloads.watch, payload);
    const workshopId = await live.workshopOf(sessionId);
    const role = await ctx.accountRoleOf(data.userId, workshopId, data.tokenVersion);
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

  on('session:sync', async (payload, who) => {
    empty(payload);
    const state = await live.state(who.sessionId);
    return who.participantId ? phoneStateOf(state) : state;
  });
  on('session:next', async (payload, who) => {
    empty(payload);
    return live.next(who.sessionId);
  });
  on('session:back', async (payload, who) => {
    empty(payload);
    return live.back(who.sessionId);
  });
  on('session:goto', async (payload, who) => live.goto(who.sessionId, parse(LivePayloads.goto, payload).index));
  on('timer:start', async (payload, who) => {
    empty(payload);
    return live.timerStart(who.sessionId);
  });
  on('timer:pause', async (payload, who) => {
    empty(payload);
    return live.timerPause(who.sessionId);
  });
  on('timer:resume', async (payload, who) => {
    empty(payload);
    return live.timerResume(who.sessionId);
  });
  on('timer:adjust', async (payload, who) => live.timerAdjust(who.sessionId, parse(LivePayloads.adjust, payload).deltaMs));
  on('session:lock', async (payload, who) => live.setLocked(who.sessionId, parse(LivePayloads.lock, payload).locked));
  on('session:reveal', async (payload, who) => live.setRevealed(who.sessionId, parse(LivePayloads.reveal, payload).revealed));
  on('session:message', async (payload, who) => live.sendMessage(who.sessionId, parse(LivePayloads.message, payload).text));
  on('agenda:shorten', async (payload, who) => live.shorten(who.sessionId, parse(LivePayloads.shorten, payload).cuts));
  on('agenda:undo-cuts', async (payload, who) => {
    empty(payload);
    return live.undoCuts(who.sessionId);
  });
  on('agenda:keep-cuts', async (payload, who) => {
    empty(payload);
    return live.keepCuts(who.sessionId);
  });
  on('participants:list', async (payload, who) => {
    empty(payload);
    return live.participants(who.sessionId);
  });
  on('submission:list', async (payload, who) =>
    live.listSubmissions(who.sessionId, parse(LivePayloads.submissionList, payload).itemId),
  );
  on('participant:me', async (payload, who) => {
    empty(payload);
    return live.me(who.participantId!, who.sessionId);
  });
  on('participant:consent', async (payload, who) =>
    live.setConsent(who.participantId!, who.sessionId, parse(LivePayloads.consent, payload).photoConsent),
  );
  on('submission:create', async (payload, who) =>
    live.createSubmission(who.participantId!, who.sessionId, parse(SubmissionInput, payload)),
  );
  return { on, parse };
}

/** What an open screen is told when its account's rights change. */
const REVOKED_MESSAGES: Record<AccessRevokedReason, string> = {
  signed_out: 'You were signed out here: the password was changed or every session was ended. Sign in again.',
  disabled: 'This account has been disabled; ask your Cairn admin.',
  removed: 'You no longer have a role on this workshop.',
  demoted: 'You can no longer run this session; you can still follow it.',
};

/** Tells a socket why it lost its rights. */
function revoke(socket: LiveSocket, reason: AccessRevokedReason): void {
  socket.emit('access:revoked', { reason, message: REVOKED_MESSAGES[reason] });
}

/**
 * Checks an account's socket against the account as it is now and applies the answer at once: a
 * disabled account or a changed token version (password changed, signed out everywhere) is told why
 * and disconnected; an account removed from the workshop leaves the session's rooms; one that may no
 * longer run it leaves the facilitators' room (and one that now may, joins it).
 */
export async function recheckAccountSocket(socket: LiveSocket, ctx: AppContext): Promise<{ watching: boolean; canRun: boolean }> {
  const data = socket.data;
  if (data.kind !== 'user' || !data.userId) return { watching: false, canRun: false };
  const watching = data.watching;
  // One query in the usual case: the account is enabled, its token current and its role known.
  const role = watching ? await ctx.accountRoleOf(data.userId, watching.workshopId, data.tokenVersion) : null;
  if (!role) {
    const user = await ctx.db.models.User.findByPk(data.userId, { attributes: ['id', 'disabled', 'tokenVersion'] });
    const ended: AccessRevokedReason | null = !user || user.disabled ? 'disabled' : user.tokenVersion !== data.tokenVersion ? 'signed_out' : null;
    if (ended) {
      revoke(socket, ended);
      // After the answer to the command that found out, so the screen gets both.
      setImmediate(() => socket.disconnect(true));
      return { watching: false, canRun: false };
    }
    if (!watching) return { watching: false, canRun: false };
    const { sessionId } = watching;
    data.watching = undefined;
    for (const room of [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId), liveRooms.session(sessionId)]) await socket.leave(room);
    revoke(socket, 'removed');
    return { watching: false, canRun: false };
  }
  const w = watching!;
  const canRun = EDIT_ROLES.includes(role);
  if (canRun !== w.canRun) {
    w.canRun = canRun;
    if (canRun) await socket.join(liveRooms.facilitators(w.sessionId));
    else {
      await socket.leave(liveRooms.facilitators(w.sessionId));
      revoke(socket, 'demoted');
    }
  }
  return { watching: true, canRun };
}

/** Rechecks this process's open sockets of one account, or of every account when it is not known which. */
export async function recheckAccounts(io: LiveIo, ctx: AppContext, userId?: string): Promise<void> {
  const ids = userId ? [...(io.sockets.adapter.rooms.get(liveRooms.account(userId)) ?? [])] : [...io.sockets.sockets.keys()];
  for (const id of ids) {
    const socket = io.sockets.sockets.get(id);
    if (socket && socket.data.kind === 'user') await recheckAccountSocket(socket, ctx);
  }
}

/**
 * Rechecks open screens as soon as an account or a membership changes (after the commit): removing a
 * co-facilitator, disabling an account, changing a password or signing out everywhere takes effect
 * on open consoles at once. Each command also rechecks, for changes made in another process.
 */
export function watchAccountChanges(io: LiveIo, ctx: AppContext): void {
  const { User, Membership } = ctx.db.models;
  const later = (options: { transaction?: Transaction | null }, userId?: string) => {
    const run = () => {
      recheckAccounts(io, ctx, userId).catch((err: unknown) => ctx.logger.warn({ err }, 'could not recheck open screens'));
    };
    if (options.transaction) options.transaction.afterCommit(run);
    else run();
  };
  User.addHook('afterUpdate', (user: UserRow, options: { transaction?: Transaction | null }) => later(options, user.id));
  User.addHook('afterBulkUpdate', (options: { transaction?: Transaction | null }) => later(options));
  for (const hook of ['afterUpdate', 'afterDestroy', 'afterCreate'] as const) {
    Membership.addHook(hook, (m: MembershipRow, options: { transaction?: Transaction | null }) => later(options, m.userId));
  }
  for (const hook of ['afterBulkUpdate', 'afterBulkDestroy'] as const) {
    Membership.addHook(hook, (options: { transaction?: Transaction | null }) => later(options));
  }
}
