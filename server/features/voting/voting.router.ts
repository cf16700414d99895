import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, READ_ROLES } from '../../common/access';
import type { VotingService } from './voting.service';
import { VoteResults } from '../../../shared/schemas/voting';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });

/** Votes over HTTP: the results of a workshop's votes, for everyone who reads the workshop (observers too), never for phones. */
export function votingRoutes(routes: ApiRoutes, voting: VotingService): void {
  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/votes',
    summary: "Results of the workshop's votes once opened: tallies with ranks and ties, the top N, preference counts, each with its status",
    tag: 'voting',
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    response: z.array(VoteResults),
    handler: ({ params }) => voting.workshopResults(params.workshopId),
  });
}
