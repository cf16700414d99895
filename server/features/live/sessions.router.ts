import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, EDIT_ROLES, OWNER_ROLES, READ_ROLES } from '../../common/access';
import type { SessionsService } from './sessions.service';
import { DiscardSessionBody, SessionKindBody, SessionSummary } from '../../../shared/schemas/live';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });
const SessionParams = WorkshopParams.extend({ sessionId: z.string().min(1).max(64) });

/** A workshop's live sessions: list them, mark one as a rehearsal or the day, discard one. */
export function sessionsRoutes(routes: ApiRoutes, sessions: SessionsService): void {
  const tag = 'live';

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/sessions',
    summary: "The workshop's live sessions, oldest first: rehearsal or the day, when, how many joined, notes and ballots",
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    response: z.array(SessionSummary),
    handler: ({ params }) => sessions.list(params.workshopId),
  });

  routes.add({
    method: 'put',
    path: '/workshops/:workshopId/sessions/:sessionId',
    summary: 'Mark a live session as a rehearsal or the day (results cover the day unless asked otherwise)',
    tag,
    access: access.workshop(EDIT_ROLES),
    params: SessionParams,
    body: SessionKindBody,
    response: SessionSummary,
    handler: ({ params, body }) => sessions.setKind(params.workshopId, params.sessionId, body.kind),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/sessions/:sessionId/discard',
    summary: 'Discard an ended live session: its participants, notes, photos (with their files), teams and votes are deleted',
    tag,
    access: access.workshop(OWNER_ROLES),
    params: SessionParams,
    body: DiscardSessionBody,
    handler: async ({ params }) => {
      await sessions.discard(params.workshopId, params.sessionId);
      return undefined;
    },
  });
}
