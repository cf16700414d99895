import type { AppContext } from '../../context';
import type { VoteRow } from '../../db/models';
import { liveRooms, type LiveService } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import type { ParticipantView } from '../../../shared/schemas/live';
import { criterionIds, participation, selectTopN, tallyDots, type Dot, type TallyRow } from '../../../shared/tally';
import { borda, schulze } from '../../../shared/preference';
import { rankedRows } from '../../../shared/votes';
import type { DotVoteResults, Participation, PreferenceResults, TeamSortResults, VoteResults } from '../../../shared/schemas/voting';

/** What a tally needs of a vote: a stored vote row, or the same columns read without the model layer. */
export type TalliedVote = Pick<VoteRow, 'id' | 'itemId' | 'kind' | 'status' | 'options' | 'rules' | 'chosen'>;

/**
 * A vote's columns for its tally, by a prepared statement on the reading connection: the model layer's
 * read (a table check and a captured stack every query) ran with every push, a few times a second
 * while a room votes. The JSON columns are stored as Sequelize writes them (JSON text).
 */
const VOTE_FOR_TALLY = 'SELECT id, itemId, kind, status, options, rules, chosen FROM votes WHERE sessionId = ? AND itemId = ?';

/**
 * A tally's room: everyone online now and everyone who voted, once each. Its loop is a function of its own: written
 * as `[...online, ...voterIds]` inside `resultsOf`, the second spread is a loop in `resultsOf`'s own bytecode, a few
 * thousand turns a push, so V8 optimised the whole of `resultsOf` with everything it calls inlined (123 and 104 ms
 * of compiling in two bursts of 5,000 dots at 1,000 phones, `BENCH_SERVER_FLAGS="--trace-opt --trace-deopt"`), and
 * dropped that code again at a deoptimisation within the same burst. With the loop here, `resultsOf` was not compiled.
 */
function roomOf(online: readonly string[], voterIds: readonly string[]): string[] {
  const ids = new Set(online);
  for (const id of voterIds) ids.add(id);
  return Array.from(ids);
}

/** Tallies pushed to a room at most this often: live enough for the console, cheap when a room of phones votes at once. */
export const TALLY_INTERVAL_MS = 300;

/**
 * A vote's tally: its results counted from the stored ballots by the pure functions of shared/, and their
 * announcement to the console (to the whole session once revealed), at most once every TALLY_INTERVAL_MS.
 */
export class VoteTally {
  /**
   * `storedDots`: a vote's stored dots from the dot path's memory (server/features/voting/dot-ledger.ts), or
   * null when it keeps none for the vote; the pushes use it instead of reading every dot row a few times a second.
   */
  constructor(
    private ctx: AppContext,
    private live: LiveService,
    private presence: PresenceService,
    private storedDots: (voteId: string) => Dot[] | null = () => null,
  ) {}

  /** The participant ids of a room's list who are online now. */
  static online(people: readonly ParticipantView[]): string[] {
    return people.filter((p) => p.online).map((p) => p.id);
  }

  /**
   * A vote's results from the stored ballots, counted by the pure functions of shared/. The room is
   * everyone online now (`online`: their participant ids) plus everyone who voted, so a voter whose
   * phone dropped still counts. `stored`: the vote's stored dots when they are known without reading the file.
   */
  async resultsOf(row: TalliedVote, itemTitle: string, online: readonly string[], stored: Dot[] | null = null): Promise<VoteResults> {
    const { VoteRanking } = this.ctx.db.models;
    const optionIds = row.options.map((o) => o.id);
    const base = { itemId: row.itemId, itemTitle, status: row.status, options: row.options, rules: row.rules, chosen: row.chosen };
    const n = Math.min(row.rules.topN, optionIds.length);

    if (row.kind === 'dot_vote') {
      const dots = stored ?? (await this.readDots(row.id));
      const voterIds = roomOf(online, dots.map((d) => d.voterId));
      const tally = tallyDots(optionIds, criterionIds(row.rules), dots);
      const { ranked, matrix } = rankedRows(row.rules, tally);
      const results: DotVoteResults = {
        kind: 'dot_vote',
        ...base,
        participation: participation(voterIds, dots, row.rules),
        perCriterion: tally.perCriterion,
        overall: tally.overall,
        ranked,
        // Options with no dot under any criterion are no tie: the cut-off says so when it falls among them.
        top: selectTopN(ranked, n, new Set(tally.overall.filter((r) => r.dots === 0).map((r) => r.optionId))),
        matrix,
      };
      return results;
    }

    const rankings = await VoteRanking.findAll({ where: { voteId: row.id } });
    const voters = roomOf(online, rankings.map((r) => r.participantId)).length;
    const rate: Participation = { voters, voted: rankings.length, rate: voters === 0 ? 0 : rankings.length / voters, dotsLeft: null };
    const ballots = rankings.map((r) => ({ ranking: r.ranking }));
    if (row.kind === 'preference_vote') {
      const bordaRows = borda(optionIds, ballots);
      const s = schulze(optionIds, ballots);
      // selectTopN reads only the option and its rank, so either method's ranking can be cut at N.
      const byMethod: TallyRow[] = (row.rules.method === 'borda' ? bordaRows : s.ranking).map((r) => ({
        optionId: r.optionId,
        dots: 0,
        rank: r.rank,
        tied: false,
        nearTie: false,
      }));
      const results: PreferenceResults = {
        kind: 'preference_vote',
        ...base,
        participation: rate,
        borda: bordaRows,
        schulze: s,
        top: selectTopN(byMethod, n),
      };
      return results;
    }
    const firstChoices: Record<string, number> = Object.fromEntries(optionIds.map((id) => [id, 0]));
    for (const r of rankings) {
      const first = r.ranking[0];
      if (first !== undefined && first in firstChoices) firstChoices[first] += 1;
    }
    const results: TeamSortResults = { kind: 'team_sort', ...base, participation: rate, firstChoices };
    return results;
  }

  /** A vote's stored dots, read from the file by a prepared statement. */
  private async readDots(voteId: string): Promise<Dot[]> {
    const rows = await this.ctx.db.read<{ participantId: string; optionId: string; criterionId: string; count: number }>(
      'SELECT participantId, optionId, criterionId, count FROM vote_dots WHERE voteId = ?',
      [voteId],
    );
    return rows.map((d) => ({ voterId: d.participantId, optionId: d.optionId, criterionId: d.criterionId, count: Number(d.count) }));
  }

  /**
   * Sends the tallies of a session's current vote soon: at once after a quiet spell, otherwise at most
   * once every TALLY_INTERVAL_MS, so a room of phones voting together costs a few broadcasts a second.
   */
  scheduleTally(sessionId: string, itemId: string): void {
    // The latest call names the item: a tally waiting for an item left behind goes out for the current one.
    this.ctx.announcer.soon(`tally:${sessionId}`, () => this.pushTally(sessionId, itemId), { everyMs: TALLY_INTERVAL_MS, what: 'the tallies' });
  }

  /** The stored vote of an item, as its tally needs it (read afresh: it may have changed in another process). */
  private async voteOf(sessionId: string, itemId: string): Promise<TalliedVote | null> {
    const [r] = await this.ctx.db.read<{ id: string; itemId: string; kind: VoteRow['kind']; status: VoteRow['status']; options: string; rules: string; chosen: string | null }>(
      VOTE_FOR_TALLY,
      [sessionId, itemId],
    );
    if (!r) return null;
    return {
      id: r.id,
      itemId: r.itemId,
      kind: r.kind,
      status: r.status,
      options: JSON.parse(r.options) as VoteRow['options'],
      rules: JSON.parse(r.rules) as VoteRow['rules'],
      chosen: r.chosen === null ? null : (JSON.parse(r.chosen) as VoteRow['chosen']),
    };
  }

  /** Sends the current vote's tallies to the facilitators, or to the whole session once revealed. */
  private async pushTally(sessionId: string, itemId: string): Promise<void> {
    const { announcer } = this.ctx;
    const state = await this.live.state(sessionId);
    if (state.item?.id !== itemId) return;
    const room = state.revealed ? liveRooms.session(sessionId) : liveRooms.facilitators(sessionId);
    // Nobody to tell (in this process, and no other process shares the broadcasts): the tally is not worked out.
    if (!announcer.listening(room)) return;
    const row = await this.voteOf(sessionId, itemId);
    if (!row || announcer.isClosed) return;
    // Who is online comes from memory: the room's list is not read a few times a second for it. So do the
    // stored dots while the dot path keeps the vote's ledger (read once inside the writer, moved by every
    // commit), unless other processes write to the same file: then they are read afresh.
    const stored = announcer.sharedWithOthers ? null : this.storedDots(row.id);
    const results = await this.resultsOf(row, state.item.title, this.presence.onlineIds(sessionId), stored);
    announcer.announce(room, 'vote:tallied', results);
  }}
