import type { AppContext } from '../../context';
import { because, errors } from '../../common/errors';
import type { CommandSocket, SocketCommands, SocketSessions } from '../../common/command';
import { EDIT_ROLES } from '../../common/access';
import { liveRooms, type LiveIo, type LiveService } from './live.service';
import type { PresenceService } from './presence.service';
import type { SubmissionsService } from './submissions.service';
import type { Transaction } from 'sequelize';
import type { MembershipRow, UserRow } from '../../db/models';
import { phoneStateOf } from '../../../shared/schemas/live';
import type { AccessRevokedReason } from '../../../shared/events';

/** A socket of the live session as the server sees it. */
export type LiveSocket = CommandSocket;

/**
 * How the command registry attaches sockets to the live session: phones are put in their session's
 * and team's rooms on connect (and counted online), projectors in their session's, accounts in their
 * own (they attach to a session with `session:watch`); an account is rechecked on each command.
 */
export function liveSessions(ctx: AppContext, presence: PresenceService): SocketSessions {
  return {
    async attach(socket) {
      const data = socket.data;
      if (data.kind === 'participant' && data.participantId && data.sessionId) {
        const p = await presence.placeOf(data.participantId, data.sessionId);
        // A token whose participant is gone (data deleted, workshop removed) connects but joins nothing.
        if (!p || socket.disconnected) return null;
        await socket.join([
          liveRooms.session(p.sessionId),
          liveRooms.participant(p.id),
          ...(p.teamId ? [liveRooms.team(p.teamId)] : []),
        ]);
        presence.participantConnected(p.sessionId, p.id);
        socket.on('disconnect', () => presence.participantDisconnected(p.sessionId, p.id));
        if (socket.disconnected) presence.participantDisconnected(p.sessionId, p.id);
        return { id: p.id, sessionId: p.sessionId };
      }
      if (data.kind === 'display' && data.sessionId) {
        await socket.join([liveRooms.session(data.sessionId), liveRooms.screens(data.sessionId)]);
      } else if (data.kind === 'user' && data.userId) {
        await socket.join(liveRooms.account(data.userId));
      }
      return null;
    },
    recheck: (socket) => recheckAccountSocket(socket, ctx),
  };
}

/** The live session's own commands: watching, moving through the agenda, the timer, the room and notes. */
export function registerLiveCommands(
  commands: SocketCommands,
  ctx: AppContext,
  { live, presence, submissions }: { live: LiveService; presence: PresenceService; submissions: SubmissionsService },
): void {
  commands.add('session:watch', async ({ payload, socket }) => {
    const data = socket.data;
    const { sessionId } = payload;
    const workshopId = await live.workshopOf(sessionId);
    const role = await ctx.accountRoleOf(data.userId!, workshopId, data.tokenVersion);
    if (!role) throw errors.forbidden('You have no role on this workshop', because('no_role'));
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
  commands.add('session:sync', async ({ who }) => {
    const state = await live.state(who.sessionId);
    return who.participantId ? phoneStateOf(state) : state;
  });
  commands.add('session:next', ({ who }) => live.next(who.sessionId));
  commands.add('session:back', ({ who }) => live.back(who.sessionId));
  commands.add('session:goto', ({ who, payload }) => live.goto(who.sessionId, payload.index));
  commands.add('timer:start', ({ who }) => live.timerStart(who.sessionId));
  commands.add('timer:pause', ({ who }) => live.timerPause(who.sessionId));
  commands.add('timer:resume', ({ who }) => live.timerResume(who.sessionId));
  commands.add('timer:adjust', ({ who, payload }) => live.timerAdjust(who.sessionId, payload.deltaMs));
  commands.add('session:lock', ({ who, payload }) => live.setLocked(who.sessionId, payload.locked));
  commands.add('session:reveal', ({ who, payload }) => live.setRevealed(who.sessionId, payload.revealed));
  commands.add('session:message', ({ who, payload }) => live.sendMessage(who.sessionId, payload.text));
  commands.add('session:projector-locale', ({ who, payload }) => live.setProjectorLocale(who.sessionId, payload.locale));
  commands.add('agenda:shorten', ({ who, payload }) => live.shorten(who.sessionId, payload.cuts));
  commands.add('agenda:undo-cuts', ({ who }) => live.undoCuts(who.sessionId));
  commands.add('agenda:keep-cuts', ({ who }) => live.keepCuts(who.sessionId));
  commands.add('participants:list', ({ who }) => presence.participants(who.sessionId));
  commands.add('submission:list', ({ who, payload }) => submissions.list(who.sessionId, payload.itemId));
  commands.add('participant:me', ({ who }) => presence.me(who.participantId!, who.sessionId));
  commands.add('participant:consent', ({ who, payload }) => presence.setConsent(who.participantId!, who.sessionId, payload.photoConsent));
  commands.add('participant:locale', ({ who, payload }) => presence.setParticipantLocale(who.participantId!, who.sessionId, payload.locale));
  commands.add('submission:create', ({ who, payload }) => submissions.create(who.participantId!, who.sessionId, payload));
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
