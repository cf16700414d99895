import type { Locale } from '../../../shared/locales';
import crypto from 'node:crypto';
import QRCode from 'qrcode';
import type { Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { LiveSessionRow } from '../../db/models';
import { instanceOf, saveChanged } from '../../db/rows';
import { AppError, because, errors } from '../../common/errors';
import { joinBaseUrl } from '../../common/network';
import { toAgendaItem, type AgendaItemFields } from '../workshops/workshops.service';
import {
  adjustTimer,
  currentIndexOf as currentIndexIn,
  endSession,
  idleTimer,
  moveTarget,
  moveTo,
  pauseTimer,
  resumeTimer,
  startTimer,
  type MoveTarget,
  type Transition,
} from '../../../shared/live-moves';
import { inputRefusal } from '../../../shared/input-gate';
import { cutRunTimeboxes, undoRunCut, withRunTimeboxes } from '../../../shared/drift';
import {
  JOIN_CODE_ALPHABET,
  JOIN_CODE_LENGTH,
  phoneStateOf,
  type LiveItem,
  type LiveSessionInfo,
  type LiveState,
  type SessionKind,
  type TimerState,
} from '../../../shared/schemas/live';
import type { AgendaItem } from '../../../shared/schemas/agenda-item';
import type { CairnIo } from '../../common/announcer';
import type { PresenceService } from './presence.service';

/** Cairn's socket.io server (the live socket handlers reach it for rooms and account checks; broadcasts go through the announcer). */
export type LiveIo = CairnIo;

/** The socket.io rooms of a live session; the socket handler joins them, the service broadcasts to them. */
export const liveRooms = {
  /** Every screen of the session: phones, the projector, the console and observers. */
  session: (sessionId: string) => `session:${sessionId}`,
  /** Owners and co-facilitators running the session. */
  facilitators: (sessionId: string) => `facilitators:${sessionId}`,
  /** Screens that show the room's head count: projectors and every watching account (not the phones). */
  screens: (sessionId: string) => `screens:${sessionId}`,
  /** The phones of one team. */
  team: (teamId: string) => `team:${teamId}`,
  /** Every socket of one participant (a phone may have several tabs), so they can be moved between team rooms. */
  participant: (participantId: string) => `participant:${participantId}`,
  /** Every socket of one signed-in account, so a change to its rights reaches its open screens at once. */
  account: (userId: string) => `account:${userId}`,
};

/** How long a pushed state may be served again to a phone that asks for it, before it is read afresh. */
const STATE_FRESH_MS = 5_000;
/** The same with several processes on one file (REDIS_URL), where another process may have changed it. */
const SHARED_STATE_FRESH_MS = 250;
/** Tries at drawing an unused join code before giving up (a clash is already about 1 in 10^10). */
const JOIN_CODE_TRIES = 10;

/** The part of a live state that does not change with the room's head count or the clock. */
type BaseState = Omit<LiveState, 'serverTime' | 'participantCount' | 'onlineCount'>;

/** What the service keeps in memory about a session: its last state, never the session's state of record. */
interface Runtime {
  /** The last state read or written, for phones that resync. */
  base: { state: BaseState; at: number } | null;
  loading: Promise<BaseState> | null;
  /** The session's workshop, once read (it never changes). */
  workshopId?: string;
}

/** An agenda item as the live screens see it. */
function toLiveItem(item: AgendaItem, index: number): LiveItem {
  return {
    id: item.id,
    index,
    type: item.type,
    phase: item.phase,
    title: item.title,
    prompt: item.prompt,
    timeboxMin: item.timeboxMin,
    settings: item.settings,
  };
}

/** Draws a join code from Cairn's alphabet with a cryptographic random source. */
function drawJoinCode(): string {
  let code = '';
  for (let i = 0; i < JOIN_CODE_LENGTH; i++) code += JOIN_CODE_ALPHABET[crypto.randomInt(JOIN_CODE_ALPHABET.length)];
  return code;
}

/** Sets a JSON attribute and marks it changed (Sequelize does not see changes inside JSON values). */
function setJson<K extends 'timer' | 'runs' | 'message' | 'timeboxes' | 'timeboxesBefore'>(row: LiveSessionRow, key: K, value: LiveSessionRow[K]): void {
  row.set(key, value);
  row.changed(key, true);
}

const sessionEnded = errors.sessionEnded;

/** The current item's place in the agenda (shared/live-moves.ts currentIndexOf). */
function currentIndexOf(session: LiveSessionRow, agenda: AgendaItem[]): number {
  return currentIndexIn(session.runs, session.currentIndex, agenda.map((i) => i.id));
}

/** A transition's new value, `false` when nothing changes, or its refusal thrown as an AppError. */
function applied<T>(t: Transition<T>): T | false {
  if ('refused' in t) throw t.refused === 'conflict' ? errors.conflict(t.message, t.why) : errors.badRequest(t.message, t.why);
  return 'unchanged' in t ? false : t.next;
}

/**
 * The live session: starting and stopping it, the agenda position and the shared countdown (the
 * transitions of shared/live-moves.ts), locking, revealing, messages, the run's timebox cuts, the state
 * every screen is sent and the one input gate over it. Every change is written to SQLite first (so a
 * restart resumes where the room was) and broadcast after the commit. Who is in the room is
 * presence.service.ts; what the phones send in is submissions.service.ts.
 */
export class LiveService {
  private runtimes = new Map<string, Runtime>();
  private endingSteps: ((sessionId: string, transaction: Transaction) => Promise<void>)[] = [];

  constructor(
    private ctx: AppContext,
    private presence: PresenceService,
  ) {
    // Another Cairn process on the same file changed something: the kept states are read afresh.
    ctx.db.onExternalChange(() => {
      for (const rt of this.runtimes.values()) rt.base = null;
    });
    // Only screens that show the head count get the new counts when the room changes; the phones' state has not changed.
    presence.onRoomChanged(async (sessionId) => {
      const screens = liveRooms.screens(sessionId);
      if (ctx.announcer.listening(screens)) ctx.announcer.announce(screens, 'session:updated', await this.state(sessionId));
    });
  }

  /** Adds a step to ending a session, run in the transaction that ends it (a feature closes what was left open). */
  onEnding(step: (sessionId: string, transaction: Transaction) => Promise<void>): void {
    this.endingSteps.push(step);
  }

  /** Forgets the kept session states (the app is shutting down; the announcer has stopped announcing). */
  close(): void {
    this.runtimes.clear();
  }

  /** Starts a live session of a workshop (a rehearsal or the day), or returns the one already live (`created` says which). */
  async start(workshopId: string, kind: SessionKind = 'day'): Promise<{ info: LiveSessionInfo; created: boolean }> {
    const { LiveSession, Workshop } = this.ctx.db.models;
    const existing = await LiveSession.findOne({ where: { workshopId, status: 'live' } });
    if (existing) return { info: this.info(existing), created: false };
    if (!(await Workshop.findByPk(workshopId, { attributes: ['id'] }))) throw errors.notFound('workshop');
    const result = await this.ctx.db.writeTx(async (transaction) => {
      // Checked again inside the writer: two facilitators pressing start at once get one session.
      const again = await LiveSession.findOne({ where: { workshopId, status: 'live' }, transaction });
      if (again) return { row: again, created: false };
      const agenda = await this.agendaOf(workshopId, transaction);
      let joinCode = '';
      for (let i = 0; i < JOIN_CODE_TRIES && !joinCode; i++) {
        const code = drawJoinCode();
        if (!(await LiveSession.findOne({ where: { joinCode: code }, attributes: ['id'], transaction }))) joinCode = code;
      }
      if (!joinCode) throw new AppError(500, 'internal', 'Could not draw an unused join code; try again', undefined, because('join_code_draw_failed'));
      const now = Date.now();
      const first = agenda[0];
      const row = await LiveSession.create(
        {
          id: crypto.randomUUID(),
          workshopId,
          joinCode,
          status: 'live',
          kind,
          timeboxes: {},
          timeboxesBefore: null,
          currentIndex: 0,
          timer: idleTimer(first?.timeboxMin),
          locked: false,
          revealed: false,
          message: null,
          runs: first ? [{ itemId: first.id, startedAt: now, endedAt: null }] : [],
          version: 1,
          startedAt: new Date(now),
          endedAt: null,
        },
        { transaction },
      );
      return { row, created: true };
    });
    return { info: this.info(result.row), created: result.created };
  }

  /** The workshop's live session, or `null` when none is live. */
  async current(workshopId: string): Promise<LiveSessionInfo | null> {
    const row = await this.ctx.db.models.LiveSession.findOne({ where: { workshopId, status: 'live' } });
    return row ? this.info(row) : null;
  }

  /** Ends the workshop's live session: input is refused from now on, and everything submitted stays. */
  async stop(workshopId: string): Promise<LiveSessionInfo> {
    const row = await this.liveRowOf(workshopId);
    const { state, session } = await this.mutate(row.id, async (s, _agenda, now, transaction) => {
      s.status = 'ended';
      s.endedAt = new Date(now);
      const end = endSession(s.timer, s.runs, now);
      setJson(s, 'timer', end.timer);
      setJson(s, 'runs', end.runs);
      for (const step of this.endingSteps) await step(s.id, transaction);
    });
    this.ctx.announcer.announce(liveRooms.session(row.id), 'session:ended', { reason: 'The facilitator ended the live session' });
    this.broadcast(state);
    return this.info(session);
  }

  /** The join link of the workshop's live session as a PNG QR code. */
  async joinQrPng(workshopId: string): Promise<Buffer> {
    const row = await this.liveRowOf(workshopId);
    return QRCode.toBuffer(this.joinUrl(row.joinCode), { type: 'png', margin: 2, width: 600, errorCorrectionLevel: 'M' });
  }

  /** Whether a session belongs to a workshop (a projector's display token opens only its own session's QR code). */
  async sessionBelongsTo(sessionId: string, workshopId: string): Promise<boolean> {
    const row = await this.ctx.db.models.LiveSession.findByPk(sessionId, { attributes: ['id', 'workshopId'] });
    return row?.workshopId === workshopId;
  }

  /** The workshop a session belongs to (for checking a watcher's role on it). */
  async workshopOf(sessionId: string): Promise<string> {
    const row = await this.ctx.db.models.LiveSession.findByPk(sessionId, { attributes: ['id', 'workshopId'] });
    if (!row) throw errors.notFound('live_session');
    return row.workshopId;
  }

  /** The session's state now, as every screen sees it. */
  async state(sessionId: string): Promise<LiveState> {
    return this.stamp(await this.baseState(sessionId));
  }

  /**
   * The input gate for a phone's note, photo, dot or ranking: the rule of shared/input-gate.ts over the
   * session's state as kept in memory (the same state every screen is sent, replaced in the commit of every
   * change, so a lock or a move that committed first is seen), answered with its error, or `null` to let
   * the input through. `inSession` says whether the participant is still in the session; without an
   * `itemId` the item is not checked.
   */
  async gate(sessionId: string, inSession: boolean, itemId?: string): Promise<AppError | null> {
    if (!inSession) return errors.notInSession();
    try {
      const why = inputRefusal(await this.baseState(sessionId), true, itemId);
      return why ? errors.inputRefused(why) : null;
    } catch (err) {
      // A session that is not there (any more) is the gate's refusal too, answered to this input alone.
      if (err instanceof AppError) return err;
      throw err;
    }
  }

  /**
   * The input gate (as `gate`, for a participant still in the session, whatever the item) and the item
   * running now, from one look at the state kept in memory: the dot path asks both for every dot.
   */
  async gateWithItem(sessionId: string): Promise<{ refused: AppError | null; item: LiveItem | null }> {
    try {
      const base = await this.baseState(sessionId);
      const why = inputRefusal(base, true);
      return { refused: why ? errors.inputRefused(why) : null, item: base.item };
    } catch (err) {
      if (err instanceof AppError) return { refused: err, item: null };
      throw err;
    }
  }

  /** Moves to the next agenda item. */
  next(sessionId: string): Promise<LiveState> {
    return this.move(sessionId, { to: 'next' });
  }

  /** Moves back to the previous agenda item. */
  back(sessionId: string): Promise<LiveState> {
    return this.move(sessionId, { to: 'back' });
  }

  /** Moves to any agenda item (the same one restarts it). */
  goto(sessionId: string, index: number): Promise<LiveState> {
    return this.move(sessionId, { to: 'index', index });
  }

  /** Starts the countdown: the whole timebox from idle, what was left when paused; a running timer carries on. */
  timerStart(sessionId: string): Promise<LiveState> {
    return this.timer(sessionId, (t, now) => startTimer(t, now));
  }

  /** Pauses a running countdown, keeping what is left. */
  timerPause(sessionId: string): Promise<LiveState> {
    return this.timer(sessionId, (t, now) => pauseTimer(t, now));
  }

  /** Resumes a paused countdown (an idle one starts). */
  timerResume(sessionId: string): Promise<LiveState> {
    return this.timer(sessionId, (t, now) => resumeTimer(t, now));
  }

  /**
   * Adds (or with a negative delta removes) time on the countdown, idle, running or paused; what is
   * left never goes below 0, and an overrun timer given a minute has one minute again.
   */
  timerAdjust(sessionId: string, deltaMs: number): Promise<LiveState> {
    return this.timer(sessionId, (t, now) => adjustTimer(t, deltaMs, now));
  }

  /** Locks or unlocks input from the phones. */
  setLocked(sessionId: string, locked: boolean): Promise<LiveState> {
    return this.command(sessionId, (s) => {
      if (s.locked === locked) return false;
      s.locked = locked;
    });
  }

  /** Sets the language the projector shows this session in. */
  setProjectorLocale(sessionId: string, locale: Locale): Promise<LiveState> {
    return this.command(sessionId, (s) => {
      if (s.projectorLocale === locale) return false;
      s.projectorLocale = locale;
    });
  }

  /** Shows or hides the current activity's results on the projector. */
  setRevealed(sessionId: string, revealed: boolean): Promise<LiveState> {
    return this.command(sessionId, (s) => {
      if (s.revealed === revealed) return false;
      s.revealed = revealed;
    });
  }

  /** Sends a short message to every phone (kept as the session's last message). */
  async sendMessage(sessionId: string, text: string): Promise<LiveState> {
    const message = { id: crypto.randomUUID(), text, sentAt: Date.now() };
    const { state } = await this.mutate(sessionId, (s) => setJson(s, 'message', message));
    this.ctx.announcer.announce(liveRooms.session(sessionId), 'session:messaged', message);
    this.broadcast(state);
    return state;
  }

  /**
   * Applies new timeboxes to later agenda items for this live run only (a shortening suggestion of
   * shared/drift.ts), never below each item's shortest timebox; the stored plan, the current item and
   * its countdown stay as they are, and the cut can be undone.
   */
  shorten(sessionId: string, cuts: { itemId: string; toMin: number }[]): Promise<LiveState> {
    return this.command(sessionId, async (s, agenda, _now, transaction) => {
      const current = currentIndexOf(s, agenda);
      for (const cut of cuts) {
        const at = agenda.findIndex((i) => i.id === cut.itemId);
        if (at < 0) throw errors.badRequest('One of the items is not on the agenda any more', because('item_not_on_agenda'));
        if (at <= current) throw errors.badRequest(`“${agenda[at]!.title}” is not after the current item; only later items can be shortened`, because('item_not_after_current', { title: agenda[at]!.title }));
      }
      const plan = await this.agendaOf(s.workshopId, transaction);
      const next = cutRunTimeboxes({ timeboxes: s.timeboxes ?? {}, before: s.timeboxesBefore ?? null }, plan, cuts);
      setJson(s, 'timeboxes', next.timeboxes);
      setJson(s, 'timeboxesBefore', next.before);
    });
  }

  /** Undoes the last cut to the live run's timeboxes. */
  undoCuts(sessionId: string): Promise<LiveState> {
    return this.command(sessionId, (s) => {
      const run = { timeboxes: s.timeboxes ?? {}, before: s.timeboxesBefore ?? null };
      if (run.before === null) throw errors.conflict('There is no cut to undo', because('no_cut_to_undo'));
      const next = undoRunCut(run);
      setJson(s, 'timeboxes', next.timeboxes);
      setJson(s, 'timeboxesBefore', next.before);
    });
  }

  /** Writes the live run's cut timeboxes into the stored plan (the facilitator's explicit choice); the run then follows the plan again. */
  keepCuts(sessionId: string): Promise<LiveState> {
    return this.command(sessionId, async (s, _agenda, _now, transaction) => {
      const cuts = Object.entries(s.timeboxes ?? {});
      if (cuts.length === 0) throw errors.conflict('This run has no cuts to write into the plan', because('no_cuts_to_write'));
      for (const [itemId, timeboxMin] of cuts) {
        await this.ctx.db.models.AgendaItem.update({ timeboxMin }, { where: { id: itemId, workshopId: s.workshopId }, transaction });
      }
      setJson(s, 'timeboxes', {});
      setJson(s, 'timeboxesBefore', null);
    });
  }

  private joinUrl(code: string): string {
    return `${joinBaseUrl(this.ctx.config)}/join/${code}`;
  }

  private info(row: LiveSessionRow): LiveSessionInfo {
    const base = joinBaseUrl(this.ctx.config);
    return {
      sessionId: row.id,
      joinCode: row.joinCode,
      joinUrl: `${base}/join/${row.joinCode}`,
      displayUrl: `${base}/projector/${row.id}?display=${this.ctx.tokens.signDisplay(row.id)}`,
      status: row.status,
      kind: row.kind ?? 'day',
    };
  }

  private async liveRowOf(workshopId: string): Promise<LiveSessionRow> {
    const row = await this.ctx.db.models.LiveSession.findOne({ where: { workshopId, status: 'live' } });
    if (!row) throw new AppError(404, 'not_found', 'This workshop has no live session; start one first', undefined, because('no_live_session'));
    return row;
  }

  /**
   * Rows of a read by a prepared statement: inside the writer's transaction when one is given, else on the
   * reading connection. Every live command reads the agenda and the title before the room hears of the
   * change; through the model layer's query path each read cost about a millisecond (a captured stack,
   * the replacements formatted into the text) of what every phone waits for.
   */
  private rows<R>(sql: string, params: unknown[], transaction?: Transaction): Promise<R[]> {
    return transaction ? this.ctx.db.raw(transaction).all<R>(sql, params) : this.ctx.db.read<R>(sql, params);
  }

  private async agendaOf(workshopId: string, transaction?: Transaction): Promise<AgendaItem[]> {
    const rows = await this.rows<Omit<AgendaItemFields, 'settings'> & { settings: string }>(
      'SELECT id, type, phase, title, timeboxMin, minTimeboxMin, prompt, settings FROM agenda_items WHERE workshopId = ? ORDER BY position ASC',
      [workshopId],
      transaction,
    );
    return rows.map((r) => toAgendaItem({ ...r, settings: JSON.parse(r.settings) as AgendaItemFields['settings'] }));
  }

  private runtime(sessionId: string): Runtime {
    let rt = this.runtimes.get(sessionId);
    if (!rt) {
      rt = { base: null, loading: null };
      this.runtimes.set(sessionId, rt);
    }
    return rt;
  }

  private toBase(s: LiveSessionRow, agenda: AgendaItem[], workshopTitle: string): BaseState {
    const index = currentIndexOf(s, agenda);
    const item = agenda[index];
    return {
      sessionId: s.id,
      workshopId: s.workshopId,
      workshopTitle,
      joinCode: s.joinCode,
      joinUrl: this.joinUrl(s.joinCode),
      status: s.status,
      kind: s.kind ?? 'day',
      timeboxes: s.timeboxes ?? {},
      canUndoCuts: (s.timeboxesBefore ?? null) !== null,
      currentIndex: index,
      itemCount: agenda.length,
      item: item ? toLiveItem(item, index) : null,
      timer: s.timer,
      locked: s.locked,
      revealed: s.revealed,
      message: s.message,
      projectorLocale: s.projectorLocale ?? 'en',
      runs: s.runs,
      version: s.version,
    };
  }

  /** The session's state without the room's counts: as kept while fresh, else read. */
  private async baseState(sessionId: string): Promise<BaseState> {
    const rt = this.runtime(sessionId);
    const freshMs = this.ctx.config.redisUrl ? SHARED_STATE_FRESH_MS : STATE_FRESH_MS;
    const fresh = rt.base && Date.now() - rt.base.at <= freshMs ? rt.base.state : null;
    return fresh ?? (await this.loadBase(sessionId));
  }

  /** Keeps a base state unless a newer version is already kept (a slow read must not undo a command). */
  private remember(base: BaseState): void {
    const rt = this.runtime(base.sessionId);
    if (!rt.base || rt.base.state.version <= base.version) rt.base = { state: base, at: Date.now() };
  }

  private async loadBase(sessionId: string): Promise<BaseState> {
    const rt = this.runtime(sessionId);
    // A room of phones resyncing at once shares one read.
    rt.loading ??= (async () => {
      try {
        const { s, agenda, title } = await this.readSession(sessionId);
        const base = this.toBase(s, agenda, title);
        this.remember(base);
        return base;
      } finally {
        rt.loading = null;
      }
    })();
    return rt.loading;
  }

  /**
   * A live session's row with its workshop's agenda and title, by prepared statements. A session's workshop
   * never changes, so once known the three are read side by side (a command's own time comes before every
   * phone's); `mutate` writes the row back the same way.
   */
  private async readSession(sessionId: string, transaction?: Transaction): Promise<{ s: LiveSessionRow; agenda: AgendaItem[]; title: string }> {
    const { LiveSession } = this.ctx.db.models;
    const known = this.runtime(sessionId).workshopId;
    const readWorkshop = (workshopId: string) =>
      Promise.all([
        this.agendaOf(workshopId, transaction),
        this.rows<{ title: string }>('SELECT title FROM workshops WHERE id = ?', [workshopId], transaction),
      ]);
    const [[row], early] = await Promise.all([
      this.rows<Record<string, unknown>>('SELECT * FROM live_sessions WHERE id = ?', [sessionId], transaction),
      known ? readWorkshop(known) : null,
    ]);
    if (!row) throw errors.notFound('live_session');
    const s = instanceOf(LiveSession, row);
    this.runtime(sessionId).workshopId = s.workshopId;
    const [plan, [w]] = early ?? (await readWorkshop(s.workshopId));
    // The live run follows its own timeboxes where cuts shortened items for this session only.
    return { s, agenda: withRunTimeboxes(plan, s.timeboxes ?? {}), title: w?.title ?? '' };
  }

  private async stamp(base: BaseState): Promise<LiveState> {
    return { ...base, ...(await this.presence.counts(base.sessionId)), serverTime: Date.now() };
  }

  /**
   * Changes a live session in one write transaction: `change` edits the row and returns `false` when
   * nothing changed; otherwise the version goes up. Refused once the session has ended.
   */
  private async mutate(
    sessionId: string,
    change: (s: LiveSessionRow, agenda: AgendaItem[], now: number, transaction: Transaction) => unknown,
  ): Promise<{ state: LiveState; changed: boolean; session: LiveSessionRow }> {
    const { base, changed, session } = await this.ctx.db.writeTx(async (transaction) => {
      const { s, agenda, title } = await this.readSession(sessionId, transaction);
      if (s.status === 'ended') throw sessionEnded();
      const changed = (await change(s, agenda, Date.now(), transaction)) !== false;
      if (changed) {
        s.version += 1;
        await saveChanged(this.ctx.db.raw(transaction), s);
      }
      const next = this.toBase(s, agenda, title);
      // Kept in the commit itself, before the writer runs the next transaction: the input gate of a dot
      // or a note queued behind this change reads the state it made.
      transaction.afterCommit(() => this.remember(next));
      return { base: next, changed, session: s };
    });
    return { state: await this.stamp(base), changed, session };
  }

  /** A change that every screen hears about when it happened. */
  private async command(
    sessionId: string,
    change: (s: LiveSessionRow, agenda: AgendaItem[], now: number, transaction: Transaction) => unknown,
  ): Promise<LiveState> {
    const { state, changed } = await this.mutate(sessionId, change);
    if (changed) this.broadcast(state);
    return state;
  }

  /** Moves the room to another agenda item (shared/live-moves.ts): its run starts, its countdown waits, results are hidden again. */
  private move(sessionId: string, target: MoveTarget): Promise<LiveState> {
    return this.command(sessionId, (s, agenda, now) => {
      const to = applied(moveTarget(currentIndexOf(s, agenda), agenda.length, target));
      if (to === false) return false;
      const moved = moveTo(s.runs, agenda[to]!, now);
      s.currentIndex = to;
      s.revealed = false;
      setJson(s, 'timer', moved.timer);
      setJson(s, 'runs', moved.runs);
    });
  }

  /** Changes the countdown by one of its transitions (shared/live-moves.ts); an unchanged timer announces nothing. */
  private timer(sessionId: string, transition: (timer: TimerState, now: number) => Transition<TimerState>): Promise<LiveState> {
    return this.command(sessionId, (s, _agenda, now) => {
      const next = applied(transition(s.timer, now));
      if (next === false) return false;
      setJson(s, 'timer', next);
    });
  }

  private broadcast(state: LiveState): void {
    const screens = liveRooms.screens(state.sessionId);
    // Two messages: the whole state to the screens that show counts and drift, and a phone's state,
    // which does not grow with the day's history, to everyone else in the session (the phones).
    this.ctx.announcer.announce(screens, 'session:updated', state);
    this.ctx.announcer.announce(liveRooms.session(state.sessionId), 'session:updated', phoneStateOf(state), { except: screens });
  }
}
