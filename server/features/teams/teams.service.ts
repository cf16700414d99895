import crypto from 'node:crypto';
import type { AppContext } from '../../context';
import { because, errors } from '../../common/errors';
import { liveRooms } from '../live/live.service';
import { teamSizes } from '../../../shared/team-sort';
import { madeName } from '../../../shared/made-names';
import type { SetTeamsPayload, Team } from '../../../shared/schemas/team';

/** Teams of a live session: forming them, setting them (after a team sort), moving phones between team rooms. */
export class TeamsService {
  constructor(private ctx: AppContext) {}

  /** The session's teams in order, with their members. */
  async list(sessionId: string): Promise<Team[]> {
    const { Team: TeamModel, Participant } = this.ctx.db.models;
    const [teams, people] = await Promise.all([
      TeamModel.findAll({ where: { sessionId, retiredAt: null }, order: [['position', 'ASC']] }),
      Participant.findAll({ where: { sessionId }, attributes: ['id', 'displayName', 'teamId', 'joinedAt'], order: [['joinedAt', 'ASC']] }),
    ]);
    return teams.map((t) => ({
      id: t.id,
      name: t.name,
      challenge: t.challenge,
      members: people.filter((p) => p.teamId === t.id).map((p) => ({ id: p.id, displayName: p.displayName })),
    }));
  }

  /**
   * Splits everyone who joined into `count` teams whose sizes differ by at most one, in a random
   * order (so friends who arrived together are spread out).
   */
  async form(sessionId: string, count: number): Promise<Team[]> {
    const people = await this.ctx.db.models.Participant.findAll({ where: { sessionId }, attributes: ['id'] });
    const ids = people.map((p) => p.id);
    for (let i = ids.length - 1; i > 0; i--) {
      const j = crypto.randomInt(i + 1);
      [ids[i], ids[j]] = [ids[j]!, ids[i]!];
    }
    const sizes = teamSizes(ids.length, Math.min(count, Math.max(1, ids.length)));
    let at = 0;
    const teams = sizes.map((size, i) => {
      const memberIds = ids.slice(at, at + size);
      at += size;
      return { name: madeName('team', i + 1), challenge: null, memberIds };
    });
    return this.set(sessionId, { teams });
  }

  /**
   * Replaces the session's teams; everyone not named is left without a team. The teams before stay,
   * retired, so the activities they ran keep their names.
   */
  async set(sessionId: string, payload: SetTeamsPayload): Promise<Team[]> {
    const { Team: TeamModel, Participant } = this.ctx.db.models;
    const seen = new Set<string>();
    for (const t of payload.teams) {
      for (const id of t.memberIds) {
        if (seen.has(id)) throw errors.badRequest('A person can be in one team only', because('one_team_each'));
        seen.add(id);
      }
    }
    const known = new Set(
      (await Participant.findAll({ where: { sessionId }, attributes: ['id'] })).map((p) => p.id),
    );
    if (![...seen].every((id) => known.has(id))) throw errors.badRequest('Every team member must have joined this session', because('team_members_joined'));
    const oldIds = (await TeamModel.findAll({ where: { sessionId, retiredAt: null }, attributes: ['id'] })).map((t) => t.id);
    const made = payload.teams.map((t, position) => ({ id: crypto.randomUUID(), ...t, position }));
    await this.ctx.db.writeTx(async (transaction) => {
      await Participant.update({ teamId: null }, { where: { sessionId }, transaction });
      await TeamModel.update({ retiredAt: new Date() }, { where: { sessionId, retiredAt: null }, transaction });
      for (const t of made) {
        await TeamModel.create({ id: t.id, sessionId, name: t.name, challenge: t.challenge ?? null, position: t.position }, { transaction });
        if (t.memberIds.length) await Participant.update({ teamId: t.id }, { where: { sessionId, id: t.memberIds }, transaction });
      }
    });
    // After the commit: move every phone into its new team's room.
    const { announcer } = this.ctx;
    for (const old of oldIds) announcer.leave(liveRooms.team(old));
    for (const t of made) for (const id of t.memberIds) announcer.join(liveRooms.participant(id), liveRooms.team(t.id));
    const teams = await this.list(sessionId);
    announcer.announce(liveRooms.session(sessionId), 'teams:updated', teams);
    return teams;
  }
}
