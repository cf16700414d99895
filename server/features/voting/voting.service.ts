import crypto from 'node:crypto';
import { UniqueConstraintError, type Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { LiveSessionRow, VoteRow } from '../../db/models';
import { AppError, because, errors } from '../../common/errors';
import { liveRooms, type LiveService } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import { type BallotErrorCode, type Dot } from '../../../shared/tally';
import { castDot, rulesFor } from '../../../shared/votes';
import { runningItemId } from '../../../shared/input-gate';
import { sortIntoTeams } from '../../../shared/team-sort';
import type { SetTeamsPayload, Team } from '../../../shared/schemas/team';
import { fieldErrors, type ErrorCode } from '../../../shared/errors';
import type { LiveItem } from '../../../shared/schemas/live';
import {
  MAX_OPTION_TEXT,
  VoteKind,
  VoteRules,
  type BallotAnswer,
  type DotPayload,
  type MyBallot,
  type ProposeTeamsPayload,
  type RankPayload,
  type TeamProposal,
  type VoteOption,
  type VoteResults,
  type VoteSetupPayload,
  type VoteView,
} from '../../../shared/schemas/voting';
import { DotLedgers, receiptKey } from './dot-ledger';
import { VoteTally } from './tally.service';

/** The current item when it is a vote, with its kind narrowed. */
type VoteItem = LiveItem & { type: VoteKind };

/** Why a dot change was refused, as an error code of Cairn's one list. */
const BALLOT_ERROR: Record<BallotErrorCode, ErrorCode> = {
  budget_exceeded: 'budget_exceeded',
  cap_exceeded: 'cap_exceeded',
  // Stacking off is a cap of one dot per option.
  stacking_off: 'cap_exceeded',
  negative: 'bad_request',
  unknown_criterion: 'bad_request',
  not_a_count: 'bad_request',
};

/**
 * How long the first dot of a group commit waits for others (server/db batchTx), ten times the writer's
 * default. A batch's fixed cost (begin, the change check, two writes, the commit, each a trip to SQLite's
 * thread, and the pages the commit appends to the log) is shared by every dot in it. At a room's pace on a
 * quiet server (about a thousand dots a second) a 16 ms window made batches of about 16 and a 40 ms one of
 * about 40: in the benchmark at 1,000 phones the server's CPU per acknowledged vote fell by about 0.1 ms.
 * From 40 to 80 ms it fell by 0.027 ms on average over six alternated pairs (docs/benchmark.md): about 70 ms
 * less on SQLite's threads and 70 ms less on the main thread for a burst of 5,000 dots. The acknowledgement's
 * median rose from about 30 to about 57 ms and its p99 from about 70 to about 105 ms at 1,000 phones (125 ms
 * in a run at 3,000). The phone shows a dot before the answer comes (src/stores/voting.ts applies castDot
 * first), so the answer only confirms it. A busy server fills its batches without waiting, and a phone's
 * join keeps the default.
 */
const DOT_BATCH_WINDOW_MS = 80;

/** Who asks for results: the facilitators see them any time, everyone else once they are revealed. */
export type ResultsAsker = 'runner' | 'screen';

/** Sets a JSON attribute and marks it changed (Sequelize does not see changes inside JSON values). */
function setJson<K extends 'options' | 'rules' | 'chosen' | 'proposal'>(row: VoteRow, key: K, value: VoteRow[K]): void {
  row.set(key, value);
  row.changed(key, true);
}

/** The rules of a vote (shared/votes.ts rulesFor), parsed with their schema; a refusal names the fields, as a payload refusal does. */
function parseRules(value: VoteRules): VoteRules {
  const r = VoteRules.safeParse(value);
  if (r.success) return r.data;
  const message = Object.entries(fieldErrors(r.error))
    .map(([field, problem]) => `${field}: ${problem}`)
    .join('; ');
  throw new AppError(400, 'validation_failed', message);
}

/** A vote row as the screens see it. */
function toView(row: VoteRow, mine: MyBallot | null): VoteView {
  return {
    itemId: row.itemId,
    kind: row.kind,
    status: row.status,
    ready: true,
    options: row.options,
    rules: row.rules,
    chosen: row.chosen,
    mine,
  };
}

/**
 * Dot votes, preference votes and team sorts of a live session. The server is the only authority on
 * stored votes: budget and cap are checked inside the write transaction that stores a dot, a retried
 * command is applied once by its client id, and tallies go to the facilitators as they change (to the
 * whole room only once revealed). Every change is written first and announced after the commit.
 */
export class VotingService {
  private teamSetter: { set(sessionId: string, payload: SetTeamsPayload): Promise<Team[]> } | null = null;
  /** The dot path's memory of votes, ballots and receipts, and its SQL. */
  private ledgers: DotLedgers;
  /** The tallies and their announcement. */
  private tally: VoteTally;

  constructor(
    private ctx: AppContext,
    private live: LiveService,
    private presence: PresenceService,
  ) {
    this.ledgers = new DotLedgers(ctx);
    this.tally = new VoteTally(ctx, live, presence, (voteId) => this.ledgers.storedDots(voteId));
    // Another Cairn process on the same file voted, or changed a vote: read the votes afresh.
    ctx.db.onExternalChange(() => this.ledgers.forget());
    // A vote left open when the session ends is closed with it: no ballot can change any more, and the results take it whole.
    live.onEnding(async (sessionId, transaction) => {
      this.ledgers.forget();
      await ctx.db.models.Vote.update({ status: 'closed' }, { where: { sessionId, status: 'open' }, transaction });
    });
  }

  /** Where a confirmed team sort sets its teams (server/features/teams). */
  useTeams(teams: { set(sessionId: string, payload: SetTeamsPayload): Promise<Team[]> }): void {
    this.teamSetter = teams;
  }

  /** The current item's vote; a participant also gets their own ballot. Before set-up, an empty draft with the plan's rules. */
  async state(sessionId: string, participantId: string | null): Promise<VoteView> {
    const item = await this.currentVoteItem(sessionId);
    const row = await this.ctx.db.models.Vote.findOne({ where: { sessionId, itemId: item.id } });
    if (!row) {
      return {
        itemId: item.id,
        kind: item.type,
        status: 'draft',
        ready: false,
        options: [],
        rules: parseRules(rulesFor(item, 0)),
        chosen: null,
        mine: participantId ? { itemId: item.id, dots: [], ranking: null } : null,
      };
    }
    return toView(row, participantId ? await this.mineOf(row, participantId) : null);
  }

  /**
   * Sets the current item's vote up: its options (typed, or notes promoted by id, whose text is used) and
   * rules. Allowed until someone has voted; an open vote must be closed first.
   */
  async setup(sessionId: string, payload: VoteSetupPayload): Promise<VoteView> {
    const { Vote, VoteDot, VoteRanking, Submission } = this.ctx.db.models;
    const item = await this.currentVoteItem(sessionId);
    const noteIds = payload.options.flatMap((o) => ('submissionId' in o ? [o.submissionId] : []));
    const notes = noteIds.length
      ? await Submission.findAll({ where: { sessionId, id: noteIds, hidden: false }, attributes: ['id', 'text'] })
      : [];
    const noteText = new Map(notes.map((n) => [n.id, n.text]));
    const options: VoteOption[] = payload.options.map((o) => {
      if ('text' in o) return { id: crypto.randomUUID(), text: o.text, submissionId: null };
      const text = noteText.get(o.submissionId);
      if (text === undefined) throw errors.badRequest('One of the notes is not in this session, or it is hidden', because('notes_not_votable'));
      return { id: crypto.randomUUID(), text: text.trim().slice(0, MAX_OPTION_TEXT), submissionId: o.submissionId };
    });
    const seen = new Set<string>();
    for (const o of options) {
      const key = o.text.toLowerCase().replace(/\s+/g, ' ');
      if (seen.has(key)) throw errors.badRequest(`Two options read “${o.text}”; keep one`, because('duplicate_option', { text: o.text }));
      seen.add(key);
    }
    const rules = parseRules(rulesFor(item, options.length, payload.rules ?? {}));
    const row = await this.ctx.db.writeTx(async (transaction) => {
      this.ledgers.forget();
      await this.checkStillCurrent(sessionId, item.id, transaction);
      const existing = await Vote.findOne({ where: { sessionId, itemId: item.id }, transaction });
      if (existing) {
        if (existing.status === 'open') throw errors.conflict('Close the vote before changing its options', because('options_while_open'));
        const cast =
          (await VoteDot.count({ where: { voteId: existing.id }, transaction })) +
          (await VoteRanking.count({ where: { voteId: existing.id }, transaction }));
        if (cast > 0) throw errors.conflict('People have voted already, so the options stay as they are', because('options_after_ballots'));
        existing.status = 'draft';
        setJson(existing, 'options', options);
        setJson(existing, 'rules', rules);
        setJson(existing, 'chosen', null);
        setJson(existing, 'proposal', null);
        await existing.save({ transaction });
        return existing;
      }
      return Vote.create(
        { id: crypto.randomUUID(), sessionId, itemId: item.id, kind: item.type, status: 'draft', options, rules, chosen: null, proposal: null },
        { transaction },
      );
    });
    return this.announce(row);
  }

  /** Opens the current item's vote (again, after a close): phones may vote and move their votes. */
  openVote(sessionId: string): Promise<VoteView> {
    return this.setStatus(sessionId, 'open');
  }

  /** Closes the current item's vote: votes are final, and the results can be carried forward. */
  closeVote(sessionId: string): Promise<VoteView> {
    return this.setStatus(sessionId, 'closed');
  }

  /**
   * Adds or takes back one dot of a participant, exactly once per `clientId`. Budget, cap and stacking
   * are checked with checkBallot inside the write transaction that stores the dot, so two phones of the
   * same person spending the last dot at once cannot overspend.
   *
   * Dots come by the thousand within seconds, so a dot is checked against the vote's ledger in memory
   * (every voter's committed dots and the session's receipts, read once) and its writes wait in memory
   * for the end of its group commit, where the whole batch is stored as a few multi-row statements
   * (`storeDots`). The acknowledgement still comes only after that commit.
   */
  async dot(participantId: string, sessionId: string, payload: DotPayload, fromSocket?: string): Promise<BallotAnswer> {
    if (!this.ledgers.knownInSession(participantId, sessionId) && !(await this.ledgers.inSession(participantId, sessionId))) throw errors.notInSession();
    const db = this.ctx.db;
    const outcome = await db.batchTx(
      async (transaction): Promise<{ refused: AppError } | { answer: BallotAnswer; applied: boolean }> => {
        // Read at the moment the write runs: a close, a lock or a move that came first has landed. A refusal
        // is answered to this dot alone (anything thrown here would roll back the whole batch).
        // One look at the live state a dot: the gate, and the current item, which is the vote's item.
        const { refused, item } = await this.live.gateWithItem(sessionId);
        if (refused) return { refused };
        if (!item || !(VoteKind.options as string[]).includes(item.type)) return { refused: errors.conflict('The current activity is not a vote', because('not_a_vote')) };
        const vote = await this.ledgers.vote(sessionId, item.id, transaction);
        if (!vote) return { refused: new AppError(409, 'conflict', 'Voting has not opened yet', undefined, { reason: 'vote_not_open' }) };
        const ledger = await this.ledgers.ledger(vote.id, sessionId, transaction);
        const mine = ledger.ballots.get(participantId) ?? [];
        const answer = (dots: Dot[]): BallotAnswer => ({
          duplicate: false,
          mine: { itemId: vote.itemId, dots: dots.map((d) => ({ optionId: d.optionId, criterionId: d.criterionId, count: d.count })), ranking: null },
        });
        // A retry of something already applied is answered before the checks, which may have changed since.
        if (ledger.receipts.has(receiptKey(participantId, payload.clientId))) return { answer: { ...answer(mine), duplicate: true }, applied: false };
        if (vote.status === 'draft') return { refused: new AppError(409, 'conflict', 'Voting has not opened yet', undefined, { reason: 'vote_not_open' }) };
        if (vote.kind !== 'dot_vote') return { refused: errors.badRequest('This vote does not take that kind of ballot', because('ballot_wrong_kind')) };
        if (vote.status === 'closed') return { refused: new AppError(409, 'conflict', 'Voting has closed; your votes stay as they were', undefined, { reason: 'vote_closed' }) };
        if (!vote.options.some((o) => o.id === payload.optionId)) return { refused: errors.badRequest('This vote has no such option', because('no_such_option')) };
        const change = { optionId: payload.optionId, criterionId: payload.criterionId, delta: payload.delta };
        const cast = castDot(vote.rules, mine, participantId, change);
        if (!cast.ok) return { refused: new AppError(BALLOT_ERROR[cast.code] === 'bad_request' ? 400 : 409, BALLOT_ERROR[cast.code], cast.message, undefined, cast.why) };
        // Checked: the ledger moves now, so the next dot of this batch sees it, and the writes wait for the commit.
        this.ledgers.record(transaction, ledger, vote, participantId, payload.clientId, cast.dots, { optionId: payload.optionId, criterionId: payload.criterionId, count: cast.count });
        return { answer: answer(cast.dots), applied: true };
      },
      // The batch rolled back: what the ledgers learnt from it is not stored, so they are read again.
      () => this.ledgers.forget(),
      DOT_BATCH_WINDOW_MS,
    );
    if ('refused' in outcome) throw outcome.refused;
    if (outcome.applied) this.afterBallot(sessionId, participantId, outcome.answer.mine, fromSocket);
    return outcome.answer;
  }

  /** Stores a participant's order of the options (replacing their earlier one), exactly once per `clientId`. */
  async rank(participantId: string, sessionId: string, payload: RankPayload, fromSocket?: string): Promise<BallotAnswer> {
    const { VoteRanking } = this.ctx.db.models;
    const { answer, applied } = await this.ballot(participantId, sessionId, payload.clientId, ['preference_vote', 'team_sort'], async (vote, transaction) => {
      const known = new Set(vote.options.map((o) => o.id));
      if (!payload.ranking.every((id) => known.has(id))) throw errors.badRequest('This vote has no such option', because('no_such_option'));
      if (new Set(payload.ranking).size !== payload.ranking.length) throw errors.badRequest('Each option can have one place only', because('rank_each_once'));
      const row = await VoteRanking.findOne({ where: { voteId: vote.id, participantId }, transaction });
      if (row) {
        row.set('ranking', payload.ranking);
        row.changed('ranking', true);
        row.updatedAt = new Date();
        await row.save({ transaction });
      } else {
        await VoteRanking.create(
          { id: crypto.randomUUID(), voteId: vote.id, participantId, ranking: payload.ranking, updatedAt: new Date() },
          { transaction },
        );
      }
    });
    if (applied) {
      this.ledgers.addReceipt(sessionId, participantId, payload.clientId);
      this.afterBallot(sessionId, participantId, answer.mine, fromSocket);
    }
    return answer;
  }

  /** The current item's results: the facilitators any time, everyone else once the facilitator reveals them. */
  async results(sessionId: string, asker: ResultsAsker): Promise<VoteResults> {
    const state = await this.live.state(sessionId);
    if (asker !== 'runner' && !state.revealed) throw errors.forbidden('The results are hidden until the facilitator shows them', because('results_hidden'));
    const item = await this.currentVoteItem(sessionId);
    const row = await this.readyVote(sessionId, item.id);
    return this.tally.resultsOf(row, item.title, VoteTally.online(await this.presence.participants(sessionId)));
  }

  /**
   * Carries the top N forward. The options ranked inside the top N must all be there; any other must
   * come from the tie at the cut-off, which the facilitator breaks by picking (shared/tally.ts selectTopN).
   */
  async choose(sessionId: string, optionIds: string[]): Promise<VoteView> {
    const item = await this.currentVoteItem(sessionId);
    const row = await this.readyVote(sessionId, item.id);
    if (row.kind === 'team_sort') throw errors.badRequest('A team sort forms teams; confirm them instead', because('team_sort_confirm'));
    if (row.status !== 'closed') throw errors.conflict('Close the vote before carrying options forward', because('close_vote_first'));
    const results = await this.tally.resultsOf(row, item.title, VoteTally.online(await this.presence.participants(sessionId)));
    if (results.kind === 'team_sort') throw errors.badRequest('A team sort forms teams; confirm them instead', because('team_sort_confirm'));
    const { selected, tiedAtCutoff } = results.top;
    const n = row.rules.topN;
    if (new Set(optionIds).size !== optionIds.length) throw errors.badRequest('Pick each option once', because('pick_each_once'));
    if (optionIds.length !== Math.min(n, row.options.length)) throw errors.badRequest(`Pick ${n} options`, because('pick_n_options', { n }));
    if (!selected.every((id) => optionIds.includes(id))) throw errors.badRequest('Keep every option ranked inside the top N', because('keep_top_n'));
    if (!optionIds.every((id) => selected.includes(id) || tiedAtCutoff.includes(id))) {
      throw errors.badRequest('Only options tied at the cut-off can be picked besides the top N', because('only_ties_extra'));
    }
    const saved = await this.ctx.db.writeTx(async (transaction) => {
      this.ledgers.forget();
      const fresh = await this.ctx.db.models.Vote.findByPk(row.id, { transaction });
      if (!fresh) throw errors.notFound('vote');
      if (fresh.status !== 'closed') throw errors.conflict('Close the vote before carrying options forward', because('close_vote_first'));
      // In the order of the ranking, so later activities list the winners first.
      const order = [...selected, ...tiedAtCutoff];
      setJson(fresh, 'chosen', [...optionIds].sort((a, b) => order.indexOf(a) - order.indexOf(b)));
      await fresh.save({ transaction });
      return fresh;
    });
    return this.announce(saved);
  }

  /**
   * Cairn's teams for the current team sort: one team per challenge, everyone who ranked the challenges or
   * is online now, sizes differing by at most one and the least total preference cost (shared/team-sort.ts).
   * With a largest team size, teams hold at most that many and the most wanted challenges take the people
   * left over. The proposal is kept with the vote; the facilitator adjusts it and confirms it with `teams:set`.
   */
  async propose(sessionId: string, given: ProposeTeamsPayload = {}): Promise<TeamProposal> {
    const { VoteRanking, Vote } = this.ctx.db.models;
    const item = await this.currentVoteItem(sessionId);
    const row = await this.readyVote(sessionId, item.id);
    if (row.kind !== 'team_sort') throw errors.badRequest('Only a team sort forms teams', because('only_team_sort'));
    const [rankings, people] = await Promise.all([
      VoteRanking.findAll({ where: { voteId: row.id } }),
      this.presence.participants(sessionId),
    ]);
    const rankingOf = new Map(rankings.map((r) => [r.participantId, r.ranking]));
    const placed = people.filter((p) => p.online || rankingOf.has(p.id));
    if (placed.length === 0) throw errors.conflict('Nobody is in the room to sort into teams yet', because('nobody_to_sort'));
    const optionIds = row.options.map((o) => o.id);
    const { maxTeamSize } = given;
    if (maxTeamSize !== undefined && maxTeamSize * optionIds.length < placed.length) {
      throw errors.badRequest(`${placed.length} people do not fit in ${optionIds.length} teams of at most ${maxTeamSize}`, because('teams_too_small', { people: placed.length, teams: optionIds.length, size: maxTeamSize }));
    }
    const result = sortIntoTeams(
      placed.map((p) => ({ id: p.id, ranking: rankingOf.get(p.id) ?? [] })),
      optionIds,
      maxTeamSize === undefined ? undefined : { maxTeamSize },
    );
    const name = new Map(placed.map((p) => [p.id, p.displayName]));
    const proposal: TeamProposal = {
      itemId: item.id,
      teams: row.options.map((o) => ({ optionId: o.id, challenge: o.text, memberIds: result.teams[o.id] ?? [] })),
      outcome: result.outcome.map((o) => ({
        participantId: o.participantId,
        displayName: name.get(o.participantId) ?? '',
        optionId: o.challengeId,
        choice: o.choice,
      })),
      cost: result.cost,
    };
    await this.ctx.db.writeTx(async (transaction) => {
      this.ledgers.forget();
      const fresh = await Vote.findByPk(row.id, { transaction });
      if (!fresh) throw errors.notFound('vote');
      setJson(fresh, 'proposal', proposal);
      await fresh.save({ transaction });
    });
    return proposal;
  }

  /**
   * Confirms the current team sort's teams: sets them (every phone moves to its team), closes the
   * vote so nobody's ranking moves any more, and records the confirmation (every challenge became a
   * team), so a reloaded console shows the confirmed teams and phones show a team only from now on.
   */
  async confirmTeams(sessionId: string, payload: SetTeamsPayload): Promise<Team[]> {
    if (!this.teamSetter) throw new Error('confirmTeams needs useTeams first');
    const item = await this.currentVoteItem(sessionId);
    const row = await this.readyVote(sessionId, item.id);
    if (row.kind !== 'team_sort') throw errors.badRequest('Only a team sort confirms teams', because('only_team_sort'));
    const teams = await this.teamSetter.set(sessionId, payload);
    const saved = await this.ctx.db.writeTx(async (transaction) => {
      this.ledgers.forget();
      const fresh = await this.ctx.db.models.Vote.findByPk(row.id, { transaction });
      if (!fresh) throw errors.notFound('vote');
      fresh.status = 'closed';
      setJson(fresh, 'chosen', fresh.options.map((o) => o.id));
      await fresh.save({ transaction });
      return fresh;
    });
    this.announce(saved);
    return teams;
  }

  /**
   * Results of every vote of a workshop's live sessions that was opened, in the order they were set up (for
   * the results page and observers); a vote the day ended without closing is there too, marked by its status.
   */
  async workshopResults(workshopId: string): Promise<VoteResults[]> {
    const { LiveSession, AgendaItem } = this.ctx.db.models;
    const sessions = await LiveSession.findAll({ where: { workshopId }, attributes: ['id'], order: [['startedAt', 'ASC']] });
    if (sessions.length === 0) return [];
    const items = await AgendaItem.findAll({ where: { workshopId }, attributes: ['id', 'title'] });
    const title = new Map(items.map((i) => [i.id, i.title]));
    const out: VoteResults[] = [];
    for (const s of sessions) out.push(...(await this.sessionResults(s.id, title)));
    return out;
  }

  /** Results of every vote of one live session that was opened, oldest first (titles of the agenda items by id). */
  async sessionResults(sessionId: string, title: Map<string, string>): Promise<VoteResults[]> {
    const votes = await this.ctx.db.models.Vote.findAll({ where: { sessionId, status: ['open', 'closed'] }, order: [['createdAt', 'ASC']] });
    if (votes.length === 0) return [];
    const online = VoteTally.online(await this.presence.participants(sessionId));
    const out: VoteResults[] = [];
    for (const v of votes) out.push(await this.tally.resultsOf(v, title.get(v.itemId) ?? '', online));
    return out;
  }

  // ---- inside ----

  /** The current agenda item of a session, refused when it is not a vote. */
  private async currentVoteItem(sessionId: string): Promise<VoteItem> {
    const state = await this.live.state(sessionId);
    const item = state.item;
    if (!item || !VoteKind.safeParse(item.type).success) throw errors.conflict('The current activity is not a vote', because('not_a_vote'));
    return item as VoteItem;
  }

  /** The vote of an item once set up. */
  private async readyVote(sessionId: string, itemId: string): Promise<VoteRow> {
    const row = await this.ctx.db.models.Vote.findOne({ where: { sessionId, itemId } });
    if (!row) throw errors.conflict('Set the vote up first: choose its options', because('vote_needs_options'));
    return row;
  }

  /** Inside a write: the session is live and the item is still the one running, so nobody votes on an activity the room has left. */
  private async checkStillCurrent(sessionId: string, itemId: string, transaction: Transaction): Promise<LiveSessionRow> {
    const s = await this.ctx.db.models.LiveSession.findByPk(sessionId, { transaction });
    if (!s) throw errors.notFound('live_session');
    if (s.status === 'ended') throw errors.sessionEnded();
    if (runningItemId(s.runs) !== itemId) throw errors.conflict('That activity is not the current one any more; nothing was changed', because('activity_moved_on'));
    return s;
  }

  private async setStatus(sessionId: string, status: 'open' | 'closed'): Promise<VoteView> {
    const item = await this.currentVoteItem(sessionId);
    const { row, changed } = await this.ctx.db.writeTx(async (transaction) => {
      this.ledgers.forget();
      await this.checkStillCurrent(sessionId, item.id, transaction);
      const vote = await this.ctx.db.models.Vote.findOne({ where: { sessionId, itemId: item.id }, transaction });
      if (!vote) throw errors.conflict('Set the vote up first: choose its options', because('vote_needs_options'));
      if (vote.status === status) return { row: vote, changed: false };
      if (status === 'closed' && vote.status === 'draft') throw errors.conflict('The vote has not opened yet', because('vote_not_opened'));
      vote.status = status;
      // Reopening makes the carried-forward choice stale: the votes may still move.
      if (status === 'open') setJson(vote, 'chosen', null);
      await vote.save({ transaction });
      return { row: vote, changed: true };
    });
    if (!changed) return toView(row, null);
    const view = this.announce(row);
    // Closing settles the tallies: the console gets the final ones at once.
    if (status === 'closed') this.tally.scheduleTally(sessionId, item.id);
    return view;
  }

  /** Tells every screen of the session about a vote's options or status (no tallies in it). */
  private announce(row: VoteRow): VoteView {
    const view = toView(row, null);
    this.ctx.announcer.announce(liveRooms.session(row.sessionId), 'vote:updated', view);
    this.tally.scheduleTally(row.sessionId, row.itemId);
    return view;
  }

  /**
   * One ballot change in one write transaction: a retry of an applied `clientId` answers with the ballot as
   * it is now; otherwise the session must be live and unlocked, the vote open and the current item's.
   */
  private async ballot(
    participantId: string,
    sessionId: string,
    clientId: string,
    kinds: VoteKind | VoteKind[],
    change: (vote: VoteRow, transaction: Transaction) => Promise<void>,
  ): Promise<{ answer: BallotAnswer; applied: boolean }> {
    const { Vote, VoteReceipt, Participant } = this.ctx.db.models;
    const allowed = Array.isArray(kinds) ? kinds : [kinds];
    const item = await this.currentVoteItem(sessionId);
    const retried = async (transaction?: Transaction) => {
      const receipt = await VoteReceipt.findOne({ where: { participantId, clientId }, transaction });
      if (!receipt) return null;
      const vote = await Vote.findByPk(receipt.voteId, { transaction });
      if (!vote) return null;
      return { answer: { duplicate: true, mine: await this.mineOf(vote, participantId, transaction) }, applied: false };
    };
    try {
      return await this.ctx.db.writeTx(async (transaction) => {
        const p = await Participant.findByPk(participantId, { transaction, attributes: ['id', 'sessionId'] });
        if (!p || p.sessionId !== sessionId) throw errors.notInSession();
        // A retry of something already applied is answered before the checks, which may have changed since.
        const again = await retried(transaction);
        if (again) return again;
        const refused = await this.live.gate(sessionId, true, item.id);
        if (refused) throw refused;
        const vote = await Vote.findOne({ where: { sessionId, itemId: item.id }, transaction });
        if (!vote || vote.status === 'draft') throw new AppError(409, 'conflict', 'Voting has not opened yet', undefined, { reason: 'vote_not_open' });
        if (!allowed.includes(vote.kind)) throw errors.badRequest('This vote does not take that kind of ballot', because('ballot_wrong_kind'));
        if (vote.status === 'closed') throw new AppError(409, 'conflict', 'Voting has closed; your votes stay as they were', undefined, { reason: 'vote_closed' });
        await change(vote, transaction);
        await VoteReceipt.create({ id: crypto.randomUUID(), participantId, clientId, voteId: vote.id, createdAt: new Date() }, { transaction });
        return { answer: { duplicate: false, mine: await this.mineOf(vote, participantId, transaction) }, applied: true };
      });
    } catch (err) {
      // The unique (participantId, clientId) index is the last word if two copies ever race past the lookup.
      if (!(err instanceof UniqueConstraintError)) throw err;
      const again = await retried();
      if (!again) throw err;
      return again;
    }
  }

  /**
   * After a ballot's commit: the participant's other phones follow (the phone that sent it has the
   * ballot in its answer, so it is left out), and the console's tally is due.
   */
  private afterBallot(sessionId: string, participantId: string, mine: MyBallot, fromSocket?: string): void {
    const room = liveRooms.participant(participantId);
    // Most phones are a participant's only socket: with nobody else in the room, the ballot is not
    // encoded and broadcast to nobody on every vote.
    if (this.ctx.announcer.listening(room, fromSocket)) this.ctx.announcer.announce(room, 'ballot:updated', mine, { except: fromSocket });
    this.tally.scheduleTally(sessionId, mine.itemId);
  }

  /** A participant's own ballot in a vote. */
  private async mineOf(vote: VoteRow, participantId: string, transaction?: Transaction): Promise<MyBallot> {
    const { VoteDot, VoteRanking } = this.ctx.db.models;
    if (vote.kind === 'dot_vote') {
      const rows = await VoteDot.findAll({ where: { voteId: vote.id, participantId }, transaction });
      return {
        itemId: vote.itemId,
        dots: rows.map((r) => ({ optionId: r.optionId, criterionId: r.criterionId, count: r.count })),
        ranking: null,
      };
    }
    const row = await VoteRanking.findOne({ where: { voteId: vote.id, participantId }, transaction });
    return { itemId: vote.itemId, dots: [], ranking: row ? row.ranking : null };
  }
}
