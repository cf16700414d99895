import { defineStore } from 'pinia';
import { computed, ref, shallowRef } from 'vue';
import { ClockSync } from '../../shared/clock';
import type { Ack, Command, CommandAnswer, CommandArgs, PagesShown, PagesTurn } from '../../shared/events';
import type { LiveState, Me, ParticipantView, ScreenState, SubmissionInput, SubmissionView } from '../../shared/schemas/live';
import type { Team } from '../../shared/schemas/team';
import { connectSocket, emitCommand, type CairnSocket } from '../socket/client';
import { newId } from '../socket/ids';
import { ClientError } from '../api/errors';
import { errorText } from '../i18n/errors';
import { useOutboxStore } from './outbox';

/** The facilitator's commands that answer with the whole live state. */
export type StateCommand = { [E in Command]: CommandAnswer<E> extends LiveState ? E : never }[Command];

type Outgoing = Omit<SubmissionInput, 'clientId'> & { clientId?: string };

const ACK_TIMEOUT_MS = 6000;

/**
 * The live session as one screen sees it: the socket, the server-owned state and the clock offset;
 * on phones it lends its socket to the one outbox (`stores/outbox.ts`) that sends notes, ballots and photos.
 */
export const useLiveStore = defineStore('live', () => {
  const state = ref<ScreenState | null>(null);
  const connected = ref(false);
  /**
   * The socket is known to be cut off: it lost its connection or could not make one. Not while the first
   * connection is still being made, which on a phone's slow link takes a moment on every load.
   */
  const offline = ref(false);
  const ended = ref(false);
  const me = ref<Me | null>(null);
  const participants = ref<ParticipantView[]>([]);
  /** The session's current teams (the console's room list names them). */
  const teams = ref<Team[]>([]);
  const submissions = ref<SubmissionView[]>([]);
  const lastMessage = ref<{ id: string; text: string; sentAt: number } | null>(null);
  const offsetMs = ref(0);
  const errorBoundMs = ref(Infinity);
  const outbox = useOutboxStore();
  /** Console: the page a projector shows of a view that does not fit one screen. */
  const pagesShown = ref<PagesShown | null>(null);
  /** Projector: the last page turn the console asked for (a new object each time, to watch). */
  const pageTurn = shallowRef<PagesTurn | null>(null);
  const socket = shallowRef<CairnSocket | null>(null);
  /** Goes up each time the socket is attached to the session (after every (re)connection), for the activity and voting views to reload. */
  const attached = ref(0);
  // The server's clock, estimated once per sync and then advanced by the monotonic clock.
  let anchorServer = Date.now();
  let anchorPerf = performance.now();

  /** The server's clock now (estimated). */
  function serverNow(): number {
    return anchorServer + (performance.now() - anchorPerf);
  }

  const currentItem = computed(() => state.value?.item ?? null);

  function accept(next: ScreenState): void {
    const cur = state.value;
    if (cur && cur.sessionId === next.sessionId && next.version < cur.version) return;
    state.value = next;
    if (next.message) lastMessage.value = next.message;
    if (next.status === 'ended') ended.value = true;
    keepLastSeen();
  }

  // A phone keeps the last screen it showed, so a reload on a bad connection shows it at once (from the
  // service worker's cached shell) and the socket's resync brings it up to date. A phone's state stays small.
  let lastSeenKey = '';
  function keepLastSeen(): void {
    if (!lastSeenKey) return;
    try {
      localStorage.setItem(lastSeenKey, JSON.stringify({ state: state.value, me: me.value }));
    } catch {
      // A full or blocked storage only costs the instant screen after a reload.
    }
  }
  function showLastSeen(sessionId: string): void {
    lastSeenKey = `cairn.last.${sessionId}`;
    try {
      const seen = JSON.parse(localStorage.getItem(lastSeenKey) ?? 'null') as { state: ScreenState | null; me: Me | null } | null;
      if (seen?.state?.sessionId === sessionId) {
        state.value = seen.state;
        me.value = seen.me;
        if (seen.state.status === 'ended') ended.value = true;
      }
    } catch {
      // Nothing usable kept: the socket's sync fills the screen.
    }
  }

  /** Sends a command and resolves with its answer; payload and answer types come from the command table. */
  async function ask<E extends Command>(event: E, ...[payload]: CommandArgs<E>): Promise<CommandAnswer<E>> {
    const s = socket.value;
    if (!s) throw new ClientError('network', 'Not connected');
    let answer: Ack<CommandAnswer<E>>;
    try {
      answer = await emitCommand(s.timeout(ACK_TIMEOUT_MS), event, payload);
    } catch {
      throw new ClientError('timeout', 'The server did not answer in time');
    }
    if ('error' in answer) {
      const { code, message, reason, params, fieldIssues } = answer.error;
      throw new ClientError(code, message, 0, {}, { reason, params, fieldIssues });
    }
    return answer.data;
  }

  /** Estimates the clock offset over a few round trips (RFC 5905 §8), keeping the least-delay sample. */
  async function syncClock(rounds = 5): Promise<void> {
    const sync = new ClockSync();
    for (let i = 0; i < rounds; i++) {
      const t1 = Date.now();
      try {
        const pong = await ask('clock:ping', { t1 });
        sync.addRoundTrip(t1, pong.t2, pong.t3, Date.now());
      } catch {
        break;
      }
    }
    if (sync.best) {
      offsetMs.value = sync.offsetMs;
      errorBoundMs.value = sync.errorBoundMs;
      anchorServer = Date.now() + sync.offsetMs;
      anchorPerf = performance.now();
    }
  }

  /** Queues a note in the phone's outbox (with a fresh client id unless given); resolves once the server has it or refused it. */
  async function submit(input: Outgoing): Promise<void> {
    await outbox.note({ ...input, clientId: input.clientId ?? newId() } as SubmissionInput);
  }

  /**
   * Connects with a token. Facilitator and display screens pass `watch` (the session to watch);
   * a participant's token already names its session.
   */
  function connect(opts: { token: () => string | null; watch?: string; participantSessionId?: string; display?: boolean }): void {
    disconnect();
    forget();
    if (opts.participantSessionId) {
      void outbox.open(opts.participantSessionId, { connected: () => connected.value, ask });
      showLastSeen(opts.participantSessionId);
    }
    const s = connectSocket(opts.token);
    socket.value = s;
    s.on('connect', async () => {
      connected.value = true;
      offline.value = false;
      // The screen's state first, the clock estimate beside it: its round trips (five, on a phone's slow
      // link most of a second) would otherwise hold back the first screen.
      const clock = syncClock();
      try {
        if (opts.watch) {
          accept(await ask('session:watch', { sessionId: opts.watch }));
        } else {
          accept(await ask('session:sync'));
          if (!opts.display) {
            me.value = await ask('participant:me');
            keepLastSeen();
          }
          void outbox.flush();
        }
        await clock;
        attached.value += 1;
      } catch (err) {
        connectFailure.value = err instanceof ClientError ? err : new ClientError('network', 'Could not reach the session');
      }
    });
    s.on('disconnect', () => {
      connected.value = false;
      offline.value = true;
    });
    s.on('connect_error', (err) => {
      connected.value = false;
      offline.value = true;
      // The handshake's refusal names a code (server/app.ts: `unauthenticated`, `token_expired`, `token_invalid`); anything else is the network's.
      const code = err.message === 'token_expired' ? 'token_expired' : err.message === 'unauthenticated' || err.message.startsWith('token_') ? 'unauthenticated' : 'network';
      connectFailure.value = new ClientError(code, err.message);
    });
    s.on('session:updated', accept);
    s.on('session:messaged', (m) => (lastMessage.value = m));
    s.on('session:ended', () => (ended.value = true));
    // The account lost its rights while this screen was open (signed out, disabled, removed): say why.
    s.on('access:revoked', (p) => (connectFailure.value = new ClientError('forbidden', p.message, 0, {}, { reason: `revoked_${p.reason}` })));
    s.on('participants:updated', (p) => (participants.value = p));
    s.on('teams:updated', (t) => {
      teams.value = t;
      // The room list follows at once: everyone's team is in the new teams (or none).
      const teamOf = new Map(t.flatMap((team) => team.members.map((m) => [m.id, team.id] as const)));
      participants.value = participants.value.map((p) => ({ ...p, teamId: teamOf.get(p.id) ?? null }));
    });
    s.on('pages:shown', (p) => (pagesShown.value = p));
    s.on('pages:turned', (t) => (pageTurn.value = { ...t }));
    s.on('submission:created', (sub) => {
      if (!submissions.value.some((x) => x.id === sub.id)) submissions.value = [...submissions.value, sub];
    });
    // Every few minutes, re-estimate the offset: clocks drift and the first sync may have been unlucky.
    clockTimer = setInterval(() => void (connected.value && syncClock(3)), 120_000);
    // Opened in a task of its own: a screen connects as it is set up, and opening the connection inside the
    // task that draws it would make that task longer on a slow phone. Not if the screen has let it go meanwhile.
    setTimeout(() => {
      if (socket.value === s) s.connect();
    }, 0);
  }
  /** Why the socket could not connect or lost its rights, as an error the screen words in its language. */
  const connectFailure = shallowRef<ClientError | null>(null);
  /** What the screen says about it, in the screen's language (never the server's English). */
  const connectError = computed(() => (connectFailure.value ? errorText(connectFailure.value, 'error.network') : null));
  let clockTimer: ReturnType<typeof setInterval> | undefined;

  /** Forgets everything of the session this screen showed before, so nothing of it shows in the next one. */
  function forget(): void {
    state.value = null;
    ended.value = false;
    me.value = null;
    participants.value = [];
    teams.value = [];
    submissions.value = [];
    lastMessage.value = null;
    pagesShown.value = null;
    pageTurn.value = null;
    outbox.close();
    connectFailure.value = null;
    lastSeenKey = '';
  }

  /** Closes the socket. */
  function disconnect(): void {
    clearInterval(clockTimer);
    socket.value?.removeAllListeners();
    socket.value?.disconnect();
    socket.value = null;
    connected.value = false;
    offline.value = false;
  }

  /** Runs a facilitator command and takes the state it answers with. */
  async function command<E extends StateCommand>(event: E, ...args: CommandArgs<E>): Promise<LiveState> {
    const next: LiveState = await ask(event, ...args);
    accept(next);
    return next;
  }

  /** The console's list of who is in the room. */
  async function loadParticipants(): Promise<void> {
    const [people, formed] = await Promise.all([ask('participants:list'), ask('teams:list')]);
    participants.value = people;
    teams.value = formed;
  }

  /** The submissions of an item so far (console). */
  async function loadSubmissions(itemId: string): Promise<void> {
    submissions.value = await ask('submission:list', { itemId });
  }

  /** The participant changes their photo consent. */
  async function setConsent(photoConsent: boolean): Promise<void> {
    me.value = await ask('participant:consent', { photoConsent });
    keepLastSeen();
  }

  return {
    state,
    connected,
    offline,
    attached,
    socket,
    ask,
    ended,
    me,
    participants,
    teams,
    submissions,
    lastMessage,
    pagesShown,
    pageTurn,
    offsetMs,
    errorBoundMs,
    connectError,
    currentItem,
    serverNow,
    connect,
    disconnect,
    command,
    submit,
    loadParticipants,
    loadSubmissions,
    setConsent,
  };
});
