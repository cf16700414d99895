import { z } from 'zod';
import { WORKSHOP_CREATOR_ROLES } from '../../../shared/schemas/user';
import type { ApiRoutes } from '../../common/route';
import { access, EDIT_ROLES, OWNER_ROLES, READ_ROLES } from '../../common/access';
import { errors } from '../../common/errors';
import type { WorkshopsService } from './workshops.service';
import { CreateWorkshopBody, UpdateWorkshopBody, Workshop, WorkshopSummary } from '../../../shared/schemas/workshop';
import { ActivityType, AgendaItem, AgendaItemInput } from '../../../shared/schemas/agenda-item';
import { computeSchedule } from '../../../shared/schedule';
import { packingList } from '../../../shared/materials';
import { cautionsFor } from '../../../shared/cautions';
import { TEMPLATES } from '../../../shared/templates';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });
const ItemParams = WorkshopParams.extend({ itemId: z.string().min(1).max(64) });

/** Workshops, their agendas, schedules and packing lists. */
export function workshopsRoutes(routes: ApiRoutes, workshops: WorkshopsService): void {
  const tag = 'workshops';
  const read = access.workshop(READ_ROLES);
  const edit = access.workshop(EDIT_ROLES);
  const own = access.workshop(OWNER_ROLES);

  routes.add({
    method: 'get',
    path: '/templates',
    summary: "Cairn's agenda templates",
    tag,
    access: access.signedIn,
    response: z.array(z.object({ id: z.string(), name: z.string(), description: z.string(), itemCount: z.number() })),
    handler: () => TEMPLATES.map((t) => ({ id: t.id, name: t.name, description: t.description, itemCount: t.items.length })),
  });

  routes.add({
    method: 'get',
    path: '/workshops',
    summary: 'The workshops the caller owns, was invited to, or (admin) all',
    tag,
    access: access.signedIn,
    response: z.array(WorkshopSummary),
    handler: ({ caller }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return workshops.list(caller.user);
    },
  });

  routes.add({
    method: 'post',
    path: '/workshops',
    summary: 'Create a workshop, blank or from a template',
    tag,
    access: access.global(...WORKSHOP_CREATOR_ROLES),
    body: CreateWorkshopBody,
    response: Workshop,
    status: 201,
    handler: async ({ caller, body }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      const id = await workshops.create(caller.user, body);
      return workshops.get(id, 'owner');
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId',
    summary: 'A workshop with its brief and agenda',
    tag,
    access: read,
    params: WorkshopParams,
    response: Workshop,
    handler: ({ params, workshopRole }) => workshops.get(params.workshopId, workshopRole!),
  });

  routes.add({
    method: 'patch',
    path: '/workshops/:workshopId',
    summary: "Change a workshop's brief",
    tag,
    access: edit,
    params: WorkshopParams,
    body: UpdateWorkshopBody,
    response: Workshop,
    handler: async ({ params, body, workshopRole }) => {
      await workshops.update(params.workshopId, body);
      return workshops.get(params.workshopId, workshopRole!);
    },
  });

  routes.add({
    method: 'delete',
    path: '/workshops/:workshopId',
    summary: 'Delete a workshop and everything in it',
    tag,
    access: own,
    params: WorkshopParams,
    handler: async ({ params }) => {
      await workshops.remove(params.workshopId);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/plan',
    summary: 'The computed schedule (times, load, warnings) and the cautions of the plan',
    tag,
    access: read,
    params: WorkshopParams,
    handler: async ({ params, workshopRole }) => {
      const w = await workshops.get(params.workshopId, workshopRole!);
      return {
        schedule: computeSchedule(w.agenda, w.window, w.rules),
        cautions: cautionsFor(w.agenda, { headcount: w.headcount, hasPhotos: false, roomCapacity: w.roomCapacity }),
      };
    },
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/agenda',
    summary: "Add an activity from the library (its defaults) or as typed",
    tag,
    access: edit,
    params: WorkshopParams,
    body: z.object({ type: ActivityType, position: z.number().int().min(0).max(200).optional(), item: AgendaItemInput.optional() }),
    response: AgendaItem,
    status: 201,
    handler: ({ params, body }) => workshops.addItem(params.workshopId, body),
  });

  routes.add({
    method: 'put',
    path: '/workshops/:workshopId/agenda/:itemId',
    summary: 'Change an agenda item',
    tag,
    access: edit,
    params: ItemParams,
    body: AgendaItemInput,
    response: AgendaItem,
    handler: ({ params, body }) => workshops.updateItem(params.workshopId, params.itemId, body),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/agenda/:itemId/duplicate',
    summary: 'Copy an agenda item right after itself',
    tag,
    access: edit,
    params: ItemParams,
    response: AgendaItem,
    status: 201,
    handler: ({ params }) => workshops.duplicateItem(params.workshopId, params.itemId),
  });

  routes.add({
    method: 'delete',
    path: '/workshops/:workshopId/agenda/:itemId',
    summary: 'Remove an agenda item',
    tag,
    access: edit,
    params: ItemParams,
    handler: async ({ params }) => {
      await workshops.removeItem(params.workshopId, params.itemId);
      return undefined;
    },
  });

  routes.add({
    method: 'put',
    path: '/workshops/:workshopId/agenda-order',
    summary: 'Put the agenda in a new order (every item id exactly once)',
    tag,
    access: edit,
    params: WorkshopParams,
    body: z.object({ ids: z.array(z.string().min(1).max(64)).max(200) }),
    response: z.array(AgendaItem),
    handler: ({ params, body }) => workshops.reorder(params.workshopId, body.ids),
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/materials',
    summary: 'The packing list for the agenda and headcount, with what is ticked off',
    tag,
    access: read,
    params: WorkshopParams,
    handler: async ({ params, workshopRole }) => {
      const w = await workshops.get(params.workshopId, workshopRole!);
      return { lines: packingList(w.agenda, w.headcount, w.teamCount), packed: w.packed };
    },
  });

  routes.add({
    method: 'put',
    path: '/workshops/:workshopId/materials/packed',
    summary: 'Store which packing-list lines are ticked off',
    tag,
    access: edit,
    params: WorkshopParams,
    body: z.object({ keys: z.array(z.string().min(1).max(40)).max(100) }),
    response: z.object({ packed: z.array(z.string()) }),
    handler: async ({ params, body }) => ({ packed: await workshops.setPacked(params.workshopId, body.keys) }),
  });
}
