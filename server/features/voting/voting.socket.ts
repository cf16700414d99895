import type { AppContext } from '../../context';
import { EDIT_ROLES } from '../../common/access';
import type { LiveCommands, LiveSocket } from '../live/live.socket';
import type { VotingService } from './voting.service';
import { LivePayloads } from '../../../shared/events';
import { ChoosePayload, DotPayload, ProposeTeamsPayload, RankPayload, VoteSetupPayload } from '../../../shared/schemas/voting';
import { SetTeamsPayload } from '../../../shared/schemas/team';

/**
 * Voting commands on a live socket: the facilitators set up, open, close and carry forward; phones
 * vote; every screen reads the vote, and the results once the facilitator reveals them.
 */
export function registerVotingSocket({ on, parse }: LiveCommands, voting: VotingService, socket: LiveSocket, ctx: AppContext): void {
  const empty = (payload: unknown) => parse(LivePayloads.empty, payload ?? {});

  /** Whether this socket is a facilitator running its session now (checked afresh, as `runner` commands are). */
  const runsSession = async (): Promise<boolean> => {
    const data = socket.data;
    if (data.kind !== 'user' || !data.userId || !data.watching) return false;
    const role = await ctx.accountRoleOf(data.userId, data.watching.workshopId, data.tokenVersion);
    return role !== null && EDIT_ROLES.includes(role);
  };

  on('vote:state', async (payload, who) => {
    empty(payload);
    return voting.state(who.sessionId, who.participantId);
  });
  on('vote:setup', async (payload, who) => voting.setup(who.sessionId, parse(VoteSetupPayload, payload)));
  on('vote:open', async (payload, who) => {
    empty(payload);
    return voting.openVote(who.sessionId);
  });
  on('vote:close', async (payload, who) => {
    empty(payload);
    return voting.closeVote(who.sessionId);
  });
  on('vote:dot', async (payload, who) => voting.dot(who.participantId!, who.sessionId, parse(DotPayload, payload), socket.id));
  on('vote:rank', async (payload, who) => voting.rank(who.participantId!, who.sessionId, parse(RankPayload, payload), socket.id));
  on('vote:results', async (payload, who) => {
    empty(payload);
    // Phones, projectors and observers see results once revealed; the facilitators see them as they come in.
    const asker = who.participantId === null && (await runsSession()) ? 'runner' : 'screen';
    return voting.results(who.sessionId, asker);
  });
  on('vote:choose', async (payload, who) => voting.choose(who.sessionId, parse(ChoosePayload, payload).optionIds));
  on('vote:sources', async (payload, who) => {
    empty(payload);
    return voting.sources(who.sessionId);
  });
  on('teams:propose', async (payload, who) => voting.propose(who.sessionId, parse(ProposeTeamsPayload, payload ?? {})));
  on('teams:confirm', async (payload, who) => voting.confirmTeams(who.sessionId, parse(SetTeamsPayload, payload)));
}
