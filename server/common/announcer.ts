import type { Server } from 'socket.io';
import type { ClientToServerEvents, ServerToClientEvents, SocketData } from '../../shared/events';

/** Cairn's socket.io server, typed by the shared events. */
export type CairnIo = Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;

/** The name of an event the server announces, e.g. `'vote:tallied'`. */
export type AnnouncedEvent = keyof ServerToClientEvents;

/** What an announced event carries, from the shared server-to-client event types. */
export type Announced<E extends AnnouncedEvent> = Parameters<ServerToClientEvents[E]>[0];

/** How often a coalesced announcement may go out. */
export interface SoonOptions {
  /** The first run after a quiet spell waits this long, gathering what comes meanwhile (0: at once). */
  afterMs?: number;
  /** Runs of the same key are at least this far apart; what comes in between waits for the next run. */
  everyMs?: number;
  /** What the run announces, for the log line when it fails ("the tallies"). */
  what: string;
}

interface SoonState {
  timer: NodeJS.Timeout | null;
  lastAt: number;
  run: () => void | Promise<void>;
  everyMs: number;
  what: string;
}

/**
 * The one way the server tells screens what changed: built before the services and handed to them,
 * attached to socket.io once it exists. `announce` sends a typed event to rooms (minus `except`);
 * `soon` and `announceSoon` coalesce frequent updates under one key with a throttle; `listening` is
 * the one policy for skipping work nobody would hear (never skipped while broadcasts are shared with
 * other processes, whose listeners this process cannot see); `close` stops everything at shutdown.
 */
export class Announcer {
  private io: CairnIo | null = null;
  private shared = false;
  private closed = false;
  private soons = new Map<string, SoonState>();
  private merged = new Map<string, { rooms: Set<string>; send: (rooms: string[]) => void }>();

  constructor(private logger: { error(obj: object, msg: string): void }) {}

  /** Announces through this socket.io server from now on; `shared`: its broadcasts also reach other Cairn processes (the Redis adapter). */
  attach(io: CairnIo, options: { shared: boolean }): void {
    this.io = io;
    this.shared = options.shared;
  }

  /** Whether broadcasts are shared with other Cairn processes (the Redis adapter): then what this process keeps in memory of the file may miss their writes. */
  get sharedWithOthers(): boolean {
    return this.shared;
  }

  /** Whether announcements go out: attached and not closed. */
  get active(): boolean {
    return this.io !== null && !this.closed;
  }

  /** Sends an event to everyone in the rooms, except the sockets or rooms in `except` (a phone that has the change in its answer). */
  announce<E extends AnnouncedEvent>(rooms: string | string[], event: E, payload: Announced<E>, options: { except?: string | string[] } = {}): void {
    if (!this.io || this.closed) return;
    const to = this.io.to(rooms);
    const target = options.except && options.except.length > 0 ? to.except(options.except) : to;
    (target.emit as (event: string, payload: unknown) => boolean)(event, payload);
  }

  /**
   * Whether anyone may hear an announcement to a room, so work for an empty room can be skipped: a
   * socket of this process other than `except` is in it, or broadcasts are shared with other processes
   * (then always true, as their listeners cannot be seen from here).
   */
  listening(room: string, except?: string): boolean {
    if (!this.io || this.closed) return false;
    if (this.shared) return true;
    const local = this.io.sockets.adapter.rooms.get(room);
    if (!local) return false;
    return local.size > (except !== undefined && local.has(except) ? 1 : 0);
  }

  /**
   * Runs `run` soon, coalescing: calls for a key while its run waits replace the run (the latest wins),
   * the first after a quiet spell waits `afterMs`, and runs of a key are at least `everyMs` apart.
   * A failing run is logged (unless shutting down); nothing runs after `close`.
   * @example announcer.soon(`tally:${sessionId}`, () => pushTally(sessionId), { everyMs: 200, what: 'the tallies' })
   */
  soon(key: string, run: () => void | Promise<void>, options: SoonOptions): void {
    if (!this.io || this.closed) return;
    const everyMs = options.everyMs ?? 0;
    let state = this.soons.get(key);
    if (!state) {
      state = { timer: null, lastAt: -Infinity, run, everyMs, what: options.what };
      this.soons.set(key, state);
    }
    state.run = run;
    state.everyMs = everyMs;
    state.what = options.what;
    if (state.timer) return;
    const s = state;
    const wait = Math.max(options.afterMs ?? 0, s.lastAt + everyMs - Date.now(), 0);
    s.timer = setTimeout(() => this.fire(key, s), wait);
  }

  private fire(key: string, s: SoonState): void {
    if (s.timer) clearTimeout(s.timer);
    s.timer = null;
    s.lastAt = Date.now();
    // A key without a spacing has nothing to remember between runs.
    if (s.everyMs === 0) this.soons.delete(key);
    if (this.closed) return;
    Promise.resolve()
      .then(s.run)
      .catch((err: unknown) => {
        if (!this.closed) this.logger.error({ err }, `could not announce ${s.what}`);
      });
  }

  /**
   * Sends an event soon, coalesced under a key as `soon` does; the rooms of the calls that waited are
   * sent to together (a socket in several of them hears it once) with the latest payload.
   * @example announcer.announceSoon(`board:${itemId}`, rooms, 'activity:changed', { itemId }, { afterMs: 250, what: 'a board change' })
   */
  announceSoon<E extends AnnouncedEvent>(key: string, rooms: string | string[], event: E, payload: Announced<E>, options: SoonOptions): void {
    if (!this.io || this.closed) return;
    const entry = this.merged.get(key) ?? { rooms: new Set<string>(), send: () => undefined };
    for (const r of typeof rooms === 'string' ? [rooms] : rooms) entry.rooms.add(r);
    entry.send = (to) => this.announce(to, event, payload);
    this.merged.set(key, entry);
    this.soon(
      key,
      () => {
        const due = this.merged.get(key);
        this.merged.delete(key);
        if (due) due.send([...due.rooms]);
      },
      options,
    );
  }

  /** Runs now every coalesced announcement waiting under a key that starts with `prefix` (a change that must reach the room at once). */
  flush(prefix: string): void {
    if (this.closed) return;
    for (const [key, s] of [...this.soons]) if (s.timer && key.startsWith(prefix)) this.fire(key, s);
  }

  /** The sockets in `room` join `target` too (a team's members into the team's room), in every process. */
  join(room: string, target: string): void {
    if (!this.io || this.closed) return;
    this.io.in(room).socketsJoin(target);
  }

  /** Every socket leaves `room`, in every process (a team that no longer exists). */
  leave(room: string): void {
    if (!this.io || this.closed) return;
    this.io.in(room).socketsLeave(room);
  }

  /** Stops: what waits is dropped and nothing is announced any more (the app is shutting down). */
  close(): void {
    this.closed = true;
    for (const s of this.soons.values()) if (s.timer) clearTimeout(s.timer);
    this.soons.clear();
    this.merged.clear();
  }

  /** Whether `close` was called; a run already under way checks it before its slow steps. */
  get isClosed(): boolean {
    return this.closed;
  }
}
