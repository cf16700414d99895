import { defineStore } from 'pinia';
import { computed, ref, shallowRef, watch } from 'vue';
import type { Command, CommandAnswer, CommandArgs, CommandPayload } from '../../shared/events';
import type { Team } from '../../shared/schemas/team';
import type {
  MyBallot,
  TeamProposal,
  VoteResults,
  VoteSetupPayload,
  VoteSources,
  VoteView,
} from '../../shared/schemas/voting';
import { castDot } from '../../shared/votes';
import type { CairnSocket } from '../socket/client';
import { newId } from '../socket/ids';
import { ClientError } from '../api/errors';
import { errorText } from '../i18n/errors';
import { useLiveStore } from './live';
import { useOutboxStore } from './outbox';

/** Which screen the store serves: a phone votes, the console runs the vote, the projector shows it. */
export type VotingScreen = 'phone' | 'console' | 'projector';

/**
 * The current vote as one screen sees it: the vote (options, rules, status), the tallies when this
 * screen may see them, the teams, and on phones the participant's own ballot. It uses the live store's
 * socket: the screen's one connection to the session.
 */
export const useVotingStore = defineStore('voting', () => {
  const vote = ref<VoteView | null>(null);
  const results = ref<VoteResults | null>(null);
  const teams = ref<Team[]>([]);
  const proposal = ref<TeamProposal | null>(null);
  const connected = ref(false);
  /** The last failure to read the vote, worded in the screen's language as `problem`. */
  const failure = shallowRef<unknown>(null);
  const problem = computed(() => (failure.value === null ? null : errorText(failure.value, 'error.network')));
  const socket = shallowRef<CairnSocket | null>(null);
  /** The item the screen shows; answers and broadcasts about another item are ignored. */
  const itemId = ref<string | null>(null);
  let screen: VotingScreen = 'phone';
  let wantResults = false;

  const mine = computed<MyBallot | null>(() => vote.value?.mine ?? null);

  /** A command on the shared socket (the live store's), refused at once while it is reconnecting. */
  async function ask<E extends Command>(event: E, ...args: CommandArgs<E>): Promise<CommandAnswer<E>> {
    if (!socket.value?.connected) throw new ClientError('network', 'Not connected; Cairn is reconnecting');
    return useLiveStore().ask(event, ...args);
  }

  // Counts the vote broadcasts heard: an answer to `vote:state` read before a broadcast that arrived while
  // it travelled is older than that broadcast and must not replace it (a phone would keep showing
  // "voting opens here…" over a vote opened meanwhile).
  let heard = 0;

  function takeVote(next: VoteView): void {
    if (itemId.value && next.itemId !== itemId.value) return;
    heard += 1;
    // Broadcasts carry no ballot: keep this phone's own.
    const keep = vote.value && vote.value.itemId === next.itemId ? vote.value.mine : null;
    vote.value = { ...next, mine: next.mine ?? keep };
  }

  function takeMine(m: MyBallot): void {
    if (vote.value && vote.value.itemId === m.itemId) vote.value = { ...vote.value, mine: m };
  }

  /**
   * Reads the vote of the item on screen again; `withResults` also reads the tallies (the console always,
   * other screens once the facilitator has revealed them).
   */
  async function refresh(forItem: string, withResults: boolean): Promise<void> {
    itemId.value = forItem;
    wantResults = withResults;
    if (vote.value?.itemId !== forItem) {
      vote.value = null;
      results.value = null;
      proposal.value = null;
    }
    if (!withResults) results.value = null;
    if (!connected.value) return;
    try {
      const before = heard;
      const v = await ask('vote:state');
      if (v.itemId !== itemId.value) return;
      const now = vote.value;
      // A broadcast heard meanwhile is at least as new as this answer; the answer still brings this phone's ballot.
      vote.value = heard !== before && now?.itemId === v.itemId ? { ...now, mine: now.mine ?? v.mine } : v;
      failure.value = null;
      if (withResults && v.ready) {
        const r = await ask('vote:results');
        if (r.itemId === itemId.value) results.value = r;
      }
      if (v.kind === 'team_sort') teams.value = await ask('teams:list');
    } catch (err) {
      // The item moved on under us; the next refresh reads the new one.
      if (err instanceof ClientError && err.code === 'conflict') return;
      failure.value = err;
    }
  }

  const onTallied = (r: VoteResults) => {
    if (r.itemId === itemId.value && (screen === 'console' || wantResults)) results.value = r;
  };
  const onTeams = (t: Team[]) => (teams.value = t);
  const onDisconnect = () => (connected.value = false);
  let stopAttached: (() => void) | null = null;

  /**
   * Shares the live store's socket (the screen's one connection to the session): listens to the
   * vote's broadcasts and reloads the vote each time the socket is attached to the session again.
   */
  function connect(opts: { screen: VotingScreen }): void {
    disconnect();
    screen = opts.screen;
    const live = useLiveStore();
    const s = live.socket;
    if (!s) return;
    socket.value = s;
    s.on('disconnect', onDisconnect);
    s.on('vote:updated', takeVote);
    s.on('vote:tallied', onTallied);
    s.on('ballot:updated', takeMine);
    s.on('teams:updated', onTeams);
    const attach = async () => {
      connected.value = true;
      try {
        if (itemId.value) await refresh(itemId.value, wantResults);
      } catch (err) {
        failure.value = err;
      }
    };
    stopAttached = watch(
      () => live.attached,
      () => void attach(),
    );
    if (live.connected && live.attached > 0) void attach();
  }

  /** Stops listening (the shared socket stays with the live store) and forgets the vote. */
  function disconnect(): void {
    stopAttached?.();
    stopAttached = null;
    const s = socket.value;
    s?.off('disconnect', onDisconnect);
    s?.off('vote:updated', takeVote);
    s?.off('vote:tallied', onTallied);
    s?.off('ballot:updated', takeMine);
    s?.off('teams:updated', onTeams);
    socket.value = null;
    connected.value = false;
    vote.value = null;
    results.value = null;
    proposal.value = null;
    teams.value = [];
    itemId.value = null;
  }

  // ---- phone: ballots go through the phone's one outbox (kept across a reload, resent with the same clientId) ----

  type Ballot = { event: 'vote:dot'; payload: CommandPayload<'vote:dot'> } | { event: 'vote:rank'; payload: CommandPayload<'vote:rank'> };

  async function send(ballot: Ballot): Promise<void> {
    const outbox = useOutboxStore();
    const answer = ballot.event === 'vote:dot' ? await outbox.ballot('vote:dot', ballot.payload) : await outbox.ballot('vote:rank', ballot.payload);
    takeMine(answer.mine);
  }

  /**
   * Adds (`+1`) or takes back (`-1`) one dot. The dot is applied here first with the same function the
   * server runs (castDot), so a refusal shows at once; the server's answer then replaces the ballot.
   */
  async function dot(optionId: string, criterionId: string, delta: 1 | -1): Promise<void> {
    const v = vote.value;
    if (!v || !v.mine) return;
    const cast = castDot(v.rules, v.mine.dots.map((d) => ({ ...d, voterId: 'me' })), 'me', { optionId, criterionId, delta });
    if (!cast.ok) throw new ClientError(cast.code, cast.message, 0, {}, cast.why);
    const nextDots = cast.dots.map(({ optionId: o, criterionId: c, count }) => ({ optionId: o, criterionId: c, count }));
    vote.value = { ...v, mine: { ...v.mine, dots: nextDots } };
    try {
      await send({ event: 'vote:dot', payload: { clientId: newId(), optionId, criterionId, delta } });
    } catch (err) {
      // The server said no: show what it holds.
      if (itemId.value) await refresh(itemId.value, wantResults);
      throw err;
    }
  }

  /** Sends this participant's order of the options (favourite first). */
  async function rank(ranking: string[]): Promise<void> {
    await send({ event: 'vote:rank', payload: { clientId: newId(), ranking } });
  }

  // ---- console ----

  /** Sets the current item's vote up. */
  async function setup(payload: VoteSetupPayload): Promise<void> {
    takeVote(await ask('vote:setup', payload));
    results.value = null;
    // The vote is saved: a slow refresh of the tallies must not read as a failed save (the next update brings them).
    if (itemId.value) await refresh(itemId.value, true).catch(() => undefined);
  }

  /** Opens or closes the current vote. */
  async function setOpen(open: boolean): Promise<void> {
    takeVote(await ask(open ? 'vote:open' : 'vote:close'));
  }

  /** Carries the chosen options forward. */
  async function choose(optionIds: string[]): Promise<void> {
    takeVote(await ask('vote:choose', { optionIds }));
    if (itemId.value) results.value = await ask('vote:results');
  }

  /** What may become options. */
  function sources(): Promise<VoteSources> {
    return ask('vote:sources');
  }

  /** Cairn's proposal of teams from the current team sort, with teams of at most `maxTeamSize` when given. */
  async function propose(maxTeamSize?: number): Promise<TeamProposal> {
    proposal.value = await ask('teams:propose', maxTeamSize === undefined ? {} : { maxTeamSize });
    return proposal.value;
  }

  /** Confirms teams (after any moves the facilitator made). */
  async function confirmTeams(payload: { teams: { name: string; challenge: string; memberIds: string[] }[] }): Promise<void> {
    teams.value = await ask('teams:confirm', payload);
  }

  return {
    vote,
    results,
    teams,
    proposal,
    connected,
    problem,
    mine,
    connect,
    disconnect,
    refresh,
    dot,
    rank,
    setup,
    setOpen,
    choose,
    sources,
    propose,
    confirmTeams,
  };
});
