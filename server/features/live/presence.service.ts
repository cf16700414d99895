import crypto from 'node:crypto';
import type { AppContext } from '../../context';
import type { ParticipantRow } from '../../db/models';
import { sqliteDate } from '../../db';
import { AppError, errors } from '../../common/errors';
import { liveRooms } from './live.service';
import type { Locale } from '../../../shared/locales';
import type { JoinAnswer, JoinBody, JoinInfo, Me, ParticipantView } from '../../../shared/schemas/live';

/** Joins, connections and consent changes within this window are announced together, so a room of phones arriving at once costs a few broadcasts, not one each. */
const ROOM_TICK_MS = 250;
/**
 * The window grows by this much per person online past 250 of them: each announcement sends the console the
 * whole room list, so with a fixed window a room of thousands joining at once costs the square of its size
 * (npm run bench, 2026-12-02, before this: server CPU per join 14.8 ms at 3,000 phones against 10.3 ms at 1,000).
 */
const ROOM_TICK_MS_PER_PERSON = 1;

/** What the service keeps in memory about a session's room. */
interface Room {
  /** Participants who ever joined; `null` until first counted. */
  participantCount: number | null;
  /** Connected sockets of each online participant. */
  online: Map<string, number>;
  /** Participants whose last-seen time is to be written at the next tick. */
  seen: Set<string>;
}

/** The refusal of a join code whose session has ended. */
function joinEnded(): AppError {
  return new AppError(404, 'not_found', 'That live session has ended', undefined, { reason: 'join_ended' });
}

/** A participant as their own phone sees them. */
function toMe(p: ParticipantRow): Me {
  return { id: p.id, displayName: p.displayName, photoConsent: p.photoConsent, teamId: p.teamId };
}

/**
 * Who is in a live session's room: joining from a phone, which participants are connected now (counted
 * by their sockets), the roster the console shows, and what a participant says about themselves (name,
 * photo consent, language). Changes to the room are announced together, coalesced by the announcer.
 */
export class PresenceService {
  private rooms = new Map<string, Room>();
  private consentListeners: ((sessionId: string, participantId: string) => void)[] = [];
  private roomListeners: ((sessionId: string) => Promise<void>)[] = [];

  constructor(private ctx: AppContext) {}

  /** Calls `listener` after a participant's photo consent changed (after the commit), so their photos can be shown or blurred at once. */
  onConsentChanged(listener: (sessionId: string, participantId: string) => void): void {
    this.consentListeners.push(listener);
  }

  /** Calls `listener` each time the room's coalesced change is announced (the live service sends the screens the new head count). */
  onRoomChanged(listener: (sessionId: string) => Promise<void>): void {
    this.roomListeners.push(listener);
  }

  /** Forgets who is online (the app is shutting down; the announcer has stopped announcing). */
  close(): void {
    this.rooms.clear();
  }

  /** How many ever joined the session (counted once, then kept) and how many are online now. */
  async counts(sessionId: string): Promise<{ participantCount: number; onlineCount: number }> {
    const room = this.room(sessionId);
    if (room.participantCount === null) {
      const count = await this.ctx.db.models.Participant.count({ where: { sessionId } });
      room.participantCount ??= count;
    }
    return { participantCount: room.participantCount ?? 0, onlineCount: room.online.size };
  }

  /** What a phone may learn about a live session from its join code before joining. */
  async joinInfo(code: string): Promise<JoinInfo> {
    const session = await this.joinable(code);
    const w = await this.ctx.db.models.Workshop.findByPk(session.workshopId, { attributes: ['id', 'title', 'consentText', 'retentionDays'] });
    if (!w) throw errors.notFound('workshop');
    return { sessionId: session.id, workshopTitle: w.title, consentText: w.consentText, retentionDays: w.retentionDays ?? null };
  }

  /**
   * Joins a live session from a phone: the same device gets the same participant back, with the name and consent it gave last.
   * A room joins within a minute, so a join shares its transaction with the writes waiting beside it
   * (`batchTx`) and looks its code up and writes its row with one prepared statement, not through the model layer.
   */
  async join(code: string, body: JoinBody): Promise<JoinAnswer> {
    const id = crypto.randomUUID();
    let rt: Room | null = null;
    const me = await this.ctx.db.batchTx(
      async (transaction): Promise<(Me & { sessionId: string }) | null> => {
        const sql = this.ctx.db.raw(transaction);
        // Dates as Sequelize writes them for SQLite, booleans as 0 and 1, so the model reads them back alike.
        const now = sqliteDate(new Date());
        const consent = body.photoConsent ? 1 : 0;
        // One statement for the code's lookup and the phone's row: a new device gets a row, a known one keeps
        // its id and team and takes the name and consent it gives now (and its language, when it says one).
        // A code that is unknown or ended inserts nothing and returns nothing.
        const [row] = await sql.all<{ id: string; sessionId: string; teamId: string | null }>(
          `INSERT INTO participants (id, sessionId, deviceId, displayName, photoConsent, teamId, email, locale, joinedAt, lastSeenAt)
           SELECT ?, s.id, ?, ?, ?, NULL, NULL, ?, ?, ? FROM live_sessions s WHERE s.joinCode = ? AND s.status = 'live'
           ON CONFLICT (sessionId, deviceId) DO UPDATE SET displayName = excluded.displayName, photoConsent = excluded.photoConsent,
             lastSeenAt = excluded.lastSeenAt, locale = COALESCE(?, participants.locale)
           RETURNING id, sessionId, teamId`,
          [id, body.deviceId, body.displayName, consent, body.locale ?? 'en', now, now, code, body.locale ?? null],
        );
        if (!row) return null;
        rt = this.room(row.sessionId);
        if (row.id === id) {
          // Counted inside the writer, so a count read at the same time elsewhere cannot miss this join.
          if (rt.participantCount === null) {
            const [n] = await sql.all<{ n: number }>('SELECT COUNT(*) AS n FROM participants WHERE sessionId = ?', [row.sessionId]);
            rt.participantCount = Number(n?.n ?? 0);
          } else rt.participantCount += 1;
        }
        return { id: row.id, displayName: body.displayName, photoConsent: body.photoConsent, teamId: row.teamId, sessionId: row.sessionId };
      },
      // The batch rolled back: the count is read afresh.
      () => {
        if (rt) rt.participantCount = null;
      },
    );
    // Nothing joined: the code is unknown or its session has ended, and the lookup says which.
    if (!me) {
      await this.joinable(code);
      throw joinEnded();
    }
    const { sessionId, ...mine } = me;
    this.scheduleTick(sessionId);
    return { token: this.ctx.tokens.signParticipant(mine.id, sessionId), sessionId, me: mine };
  }

  /** Where a participant's socket belongs (its session and team), or `null` when there is no such participant in the session; read when a phone connects. */
  async placeOf(participantId: string, sessionId: string): Promise<{ id: string; sessionId: string; teamId: string | null } | null> {
    const [p] = await this.ctx.db.read<{ id: string; sessionId: string; teamId: string | null }>('SELECT id, sessionId, teamId FROM participants WHERE id = ?', [participantId]);
    return p && p.sessionId === sessionId ? p : null;
  }

  /** A participant of a session, or `null` when there is no such participant in it. */
  async participantOf(participantId: string, sessionId: string): Promise<ParticipantRow | null> {
    const p = await this.ctx.db.models.Participant.findByPk(participantId);
    return p && p.sessionId === sessionId ? p : null;
  }

  /** Counts a participant's socket as connected; they are online while any of their sockets is. */
  participantConnected(sessionId: string, participantId: string): void {
    if (!this.ctx.announcer.active) return;
    const rt = this.room(sessionId);
    const sockets = (rt.online.get(participantId) ?? 0) + 1;
    rt.online.set(participantId, sockets);
    if (sockets === 1) {
      rt.seen.add(participantId);
      this.scheduleTick(sessionId);
    }
  }

  /** Counts a participant's socket as gone. */
  participantDisconnected(sessionId: string, participantId: string): void {
    if (!this.ctx.announcer.active) return;
    const rt = this.room(sessionId);
    const sockets = (rt.online.get(participantId) ?? 1) - 1;
    if (sockets > 0) {
      rt.online.set(participantId, sockets);
      return;
    }
    rt.online.delete(participantId);
    rt.seen.add(participantId);
    this.scheduleTick(sessionId);
  }

  /** The participants of a session online now (in this process), as `participants` marks them, without reading the list. */
  onlineIds(sessionId: string): string[] {
    return [...this.room(sessionId).online.keys()];
  }

  /** Everyone who joined the session, with whether they are online now, in order of joining. */
  async participants(sessionId: string): Promise<ParticipantView[]> {
    // A prepared read: the list of a full room is read at every room tick while a room of phones joins.
    const rows = await this.ctx.db.read<{ id: string; displayName: string; photoConsent: number | boolean; teamId: string | null; joinedAt: string }>(
      'SELECT id, displayName, photoConsent, teamId, joinedAt FROM participants WHERE sessionId = ? ORDER BY joinedAt ASC',
      [sessionId],
    );
    const online = this.room(sessionId).online;
    return rows.map((p) => ({
      id: p.id,
      displayName: p.displayName,
      photoConsent: Boolean(p.photoConsent),
      teamId: p.teamId,
      online: online.has(p.id),
      joinedAt: new Date(p.joinedAt).getTime(),
    }));
  }

  /** What a participant's phone knows about them. */
  async me(participantId: string, sessionId: string): Promise<Me> {
    const p = await this.participantOf(participantId, sessionId);
    if (!p) throw errors.notInSession();
    return toMe(p);
  }

  /** A participant gives or withdraws photo consent (allowed even after the session ended). */
  async setConsent(participantId: string, sessionId: string, photoConsent: boolean): Promise<Me> {
    const p = await this.ctx.db.writeTx(async (transaction) => {
      const row = await this.ctx.db.models.Participant.findByPk(participantId, { transaction });
      if (!row || row.sessionId !== sessionId) throw errors.notInSession();
      row.photoConsent = photoConsent;
      await row.save({ transaction });
      return row;
    });
    this.scheduleTick(sessionId);
    for (const listener of this.consentListeners) listener(sessionId, participantId);
    return toMe(p);
  }

  /** Keeps the language a participant's phone now shows, for the e-mail with the report. */
  async setParticipantLocale(participantId: string, sessionId: string, locale: Locale): Promise<Me> {
    const p = await this.ctx.db.writeTx(async (transaction) => {
      const row = await this.ctx.db.models.Participant.findByPk(participantId, { transaction });
      if (!row || row.sessionId !== sessionId) throw errors.forbidden('You are not in this session any more; join again');
      row.locale = locale;
      await row.save({ transaction });
      return row;
    });
    return toMe(p);
  }

  private async joinable(code: string): Promise<{ id: string; workshopId: string }> {
    // A prepared read: every phone of a room looks its code up once or twice within a minute.
    const [row] = await this.ctx.db.read<{ id: string; workshopId: string; status: string }>('SELECT id, workshopId, status FROM live_sessions WHERE joinCode = ?', [code]);
    if (!row) {
      throw new AppError(404, 'not_found', `No live session has the code ${code}; check the code on the room’s screen`, undefined, { reason: 'join_code_unknown', params: { code } });
    }
    if (row.status !== 'live') throw joinEnded();
    return row;
  }

  private room(sessionId: string): Room {
    let room = this.rooms.get(sessionId);
    if (!room) {
      room = { participantCount: null, online: new Map(), seen: new Set() };
      this.rooms.set(sessionId, room);
    }
    return room;
  }

  /** Who is in the room is announced soon, coalescing a room of phones joining at once (the longer, the more are online). */
  private scheduleTick(sessionId: string): void {
    const rt = this.room(sessionId);
    this.ctx.announcer.soon(`room:${sessionId}`, () => this.flushTick(sessionId), {
      afterMs: Math.max(ROOM_TICK_MS, rt.online.size * ROOM_TICK_MS_PER_PERSON),
      what: 'who is in the room',
    });
  }

  /** Writes last-seen times and tells the console who is in the room now (and the room listeners, for the head count on the screens). */
  private async flushTick(sessionId: string): Promise<void> {
    const { announcer } = this.ctx;
    if (announcer.isClosed) return;
    const rt = this.room(sessionId);
    if (rt.seen.size > 0) {
      const ids = [...rt.seen];
      rt.seen.clear();
      // One prepared statement whose ids come as one JSON array, in the group commit beside the joins
      // waiting at that moment; the date as Sequelize writes it for SQLite, so the model reads it back alike.
      const now = sqliteDate(new Date());
      await this.ctx.db.batchTx(async (transaction) => {
        await this.ctx.db.raw(transaction).run('UPDATE participants SET lastSeenAt = ? WHERE id IN (SELECT value FROM json_each(?))', [now, JSON.stringify(ids)]);
      });
    }
    if (announcer.listening(liveRooms.facilitators(sessionId))) {
      announcer.announce(liveRooms.facilitators(sessionId), 'participants:updated', await this.participants(sessionId));
    }
    for (const listener of this.roomListeners) await listener(sessionId);
  }
}
