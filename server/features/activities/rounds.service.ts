import type { Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { ActivityStateRow, AgendaItemRow } from '../../db/models';
import { because, errors } from '../../common/errors';
import { liveRooms } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import type { ActivitiesService } from './activities.service';
import { pairsForRound, roundRobinLength, testRotation } from '../../../shared/rotations';
import { PAIRED_TYPES, ROUND_TYPES } from '../../../shared/activities';
import type { ActivityType } from '../../../shared/schemas/agenda-item';
import type { PersonRef, RoundView } from '../../../shared/schemas/activities';

/**
 * Activities run in rounds: rotating pairs (drawn from whoever is online, late joiners added from the
 * next round on, by the rotation of shared/rotations.ts) and the teams' test visits. The console moves
 * between rounds; every screen hears the round it is in.
 */
export class RoundsService {
  constructor(
    private ctx: AppContext,
    private activities: ActivitiesService,
    private presence: PresenceService,
  ) {}

  /** The current round of an item run in rounds; the first look draws the pairs from whoever is online. */
  async round(sessionId: string, itemId: string): Promise<RoundView> {
    const item = await this.activities.itemOf(sessionId, itemId);
    if (!ROUND_TYPES.has(item.type as ActivityType)) throw errors.badRequest('This activity does not run in rounds', because('no_rounds'));
    let state = await this.ctx.db.models.ActivityState.findOne({ where: { sessionId, itemId } });
    if (!state || (PAIRED_TYPES.has(item.type as ActivityType) && state.roster === null)) {
      state = await this.ctx.db.writeTx((transaction) => this.stateFor(sessionId, item, transaction));
    }
    return this.roundView(sessionId, item, state);
  }

  /** Goes to a round (the console's next and back), or draws the pairs again from whoever is online now; every screen hears it. */
  async setRound(sessionId: string, itemId: string, round: number, regroup: boolean): Promise<RoundView> {
    const item = await this.activities.itemOf(sessionId, itemId);
    if (!ROUND_TYPES.has(item.type as ActivityType)) throw errors.badRequest('This activity does not run in rounds', because('no_rounds'));
    const state = await this.ctx.db.writeTx(async (transaction) => {
      const s = await this.stateFor(sessionId, item, transaction, regroup);
      if (!regroup && round > s.round && PAIRED_TYPES.has(item.type as ActivityType)) await this.addLateJoiners(sessionId, s);
      s.round = round;
      await s.save({ transaction });
      return s;
    });
    const view = await this.roundView(sessionId, item, state);
    this.ctx.announcer.announce(liveRooms.session(sessionId), 'rounds:updated', view);
    return view;
  }

  /**
   * People who joined after the pairs were drawn and are online join the rotation from the next round
   * on, so nobody waits for the facilitator to pair everyone again (the pairs of later rounds change).
   */
  private async addLateJoiners(sessionId: string, state: ActivityStateRow): Promise<void> {
    const inRoster = new Set(state.roster ?? []);
    const late = (await this.presence.participants(sessionId)).filter((p) => p.online && !inRoster.has(p.id)).map((p) => p.id);
    if (late.length === 0) return;
    state.roster = [...(state.roster ?? []), ...late];
    state.changed('roster', true);
  }

  /** The item's state, made on first use; pairs are drawn then (or again with `regroup`) from whoever is online. */
  private async stateFor(sessionId: string, item: AgendaItemRow, transaction: Transaction, regroup = false): Promise<ActivityStateRow> {
    const state = await this.activities.stateOf(sessionId, item.id, transaction);
    if (PAIRED_TYPES.has(item.type as ActivityType) && (state.roster === null || regroup)) {
      const people = await this.presence.participants(sessionId);
      const online = people.filter((p) => p.online);
      // Pair whoever is here; before anyone's phone is connected, everyone who joined.
      state.roster = (online.length ? online : people).map((p) => p.id);
      state.changed('roster', true);
    }
    await state.save({ transaction });
    return state;
  }

  /** A round as the screens see it: the pairs and who rests, or the test visits, with the people named. */
  private async roundView(sessionId: string, item: AgendaItemRow, state: ActivityStateRow): Promise<RoundView> {
    const people = await this.ctx.db.models.Participant.findAll({ where: { sessionId }, attributes: ['id', 'displayName', 'joinedAt'], order: [['joinedAt', 'ASC']] });
    const person = new Map<string, PersonRef>(people.map((p) => [p.id, { id: p.id, displayName: p.displayName }]));
    const teams = await this.activities.teams(sessionId);
    const base = { itemId: item.id, round: state.round, pairs: [], resting: null, newcomers: [], visits: [], teams };
    if (item.type === 'test_rounds') {
      const hosts = teams.filter((t) => t.memberIds.length > 0);
      const roundCount = item.settings.rounds ?? Math.max(1, hosts.length - 1);
      const teamOf = new Map(hosts.flatMap((t) => t.memberIds.map((m) => [m, t.id] as const)));
      const visits = hosts.length < 2 ? [] : testRotation(hosts, state.round + 1)[state.round]!.visits;
      return {
        ...base,
        roundCount,
        visits: visits.map((v) => ({ tester: person.get(v.testerId)!, testerTeamId: teamOf.get(v.testerId)!, hostTeamId: v.hostTeamId })),
      };
    }
    // Someone who left the session (their data deleted) drops out of the rotation.
    const roster = (state.roster ?? []).filter((id) => person.has(id));
    const { pairs, resting } = pairsForRound(roster, state.round);
    const inRoster = new Set(roster);
    return {
      ...base,
      roundCount: item.settings.rounds ?? roundRobinLength(roster.length),
      pairs: pairs.map(([a, b]) => ({ a: person.get(a)!, b: person.get(b)! })),
      resting: resting ? person.get(resting)! : null,
      newcomers: people.filter((p) => !inRoster.has(p.id)).map((p) => person.get(p.id)!),
    };
  }
}
