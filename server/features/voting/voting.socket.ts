import type { AppContext } from '../../context';
import { EDIT_ROLES } from '../../common/access';
import type { CommandSocket, SocketCommands } from '../../common/command';
import type { VotingService } from './voting.service';
import type { VoteSourcesService } from './vote-sources.service';

/**
 * Voting commands: the facilitators set up, open, close and carry forward; phones vote; every
 * screen reads the vote, and the results once the facilitator reveals them.
 */
export function registerVotingSocket(commands: SocketCommands, voting: VotingService, sources: VoteSourcesService, ctx: AppContext): void {
  /** Whether this socket is a facilitator running its session now (checked afresh, as `runner` commands are). */
  const runsSession = async (socket: CommandSocket): Promise<boolean> => {
    const data = socket.data;
    if (data.kind !== 'user' || !data.userId || !data.watching) return false;
    const role = await ctx.accountRoleOf(data.userId, data.watching.workshopId, data.tokenVersion);
    return role !== null && EDIT_ROLES.includes(role);
  };

  commands.add('vote:state', ({ who }) => voting.state(who.sessionId, who.participantId));
  commands.add('vote:setup', ({ who, payload }) => voting.setup(who.sessionId, payload));
  commands.add('vote:open', ({ who }) => voting.openVote(who.sessionId));
  commands.add('vote:close', ({ who }) => voting.closeVote(who.sessionId));
  commands.add('vote:dot', ({ who, payload, socket }) => voting.dot(who.participantId!, who.sessionId, payload, socket.id));
  commands.add('vote:rank', ({ who, payload, socket }) => voting.rank(who.participantId!, who.sessionId, payload, socket.id));
  commands.add('vote:results', async ({ who, socket }) => {
    // Phones, projectors and observers see results once revealed; the facilitators see them as they come in.
    const asker = who.participantId === null && (await runsSession(socket)) ? 'runner' : 'screen';
    return voting.results(who.sessionId, asker);
  });
  commands.add('vote:choose', ({ who, payload }) => voting.choose(who.sessionId, payload.optionIds));
  commands.add('vote:sources', ({ who }) => sources.list(who.sessionId));
  commands.add('teams:propose', ({ who, payload }) => voting.propose(who.sessionId, payload));
  commands.add('teams:confirm', ({ who, payload }) => voting.confirmTeams(who.sessionId, payload));
}
