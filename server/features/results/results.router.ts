import type { Response } from 'express';
import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, EDIT_ROLES, OWNER_ROLES, READ_ROLES } from '../../common/access';
import { errors } from '../../common/errors';
import type { AppContext } from '../../context';
import { mailLinkBase } from '../../common/network';
import type { ResultsService } from './results.service';
import type { ReportService } from './report.service';
import type { RetentionService } from './retention.service';
import { exportFile } from './export.service';
import { parseSessionSelector } from '../../../shared/sessions';
import {
  DeleteNowBody,
  ExportFile,
  ExportQuery,
  MyData,
  ReportEmailBody,
  ReportRecipients,
  ResultsQuery,
  RetentionBody,
  RetentionStatus,
  SendReportAnswer,
  SendReportBody,
  WorkshopResults,
} from '../../../shared/schemas/results';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });

/** Sends a file to download; results change as long as the workshop lives, so nothing is cached. */
function download(res: Response, body: string | Buffer, contentType: string, fileName: string): void {
  res.set('Cache-Control', 'no-store').type(contentType).attachment(fileName).send(body);
}

/**
 * After the workshop: the results, the exports, the report (PDF) and sending it, deleting personal
 * data; and what a participant may do about their own data from the phone.
 */
export function resultsRoutes(
  routes: ApiRoutes,
  app: AppContext,
  services: { results: ResultsService; report: ReportService; retention: RetentionService },
): void {
  const { results, report, retention } = services;
  const tag = 'results';

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/results',
    summary:
      "The workshop's results: agenda as run, every activity's notes, votes and grids, teams, participation; `?sessions=` day (default), all or session ids; `?anonymize=true` removes names",
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    query: ResultsQuery,
    response: WorkshopResults,
    handler: ({ params, query }) => results.results(params.workshopId, query.anonymize, Date.now(), parseSessionSelector(query.sessions)),
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/exports/:file',
    summary:
      'Download one export: a CSV per table (RFC 4180; text that starts like a formula gets an apostrophe unless `?raw=true`; `?bom=true` for spreadsheets) or the complete results as JSON; `?anonymize=true` removes names',
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams.extend({ file: ExportFile }),
    query: ExportQuery,
    produces: 'text/csv',
    handler: async ({ params, query, res }) => {
      const r = await results.results(params.workshopId, query.anonymize, Date.now(), parseSessionSelector(query.sessions));
      const file = exportFile(r, params.file, { bom: query.bom, raw: query.raw });
      download(res, file.body, file.contentType, file.fileName);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/report.pdf',
    summary: 'The printed report as a PDF: brief, agenda as run, results, teams, participation and next steps; `?anonymize=true` removes names',
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    query: ResultsQuery,
    produces: 'application/pdf',
    handler: async ({ params, query, res }) => {
      const { pdf, fileName } = await report.pdf(params.workshopId, query.anonymize, parseSessionSelector(query.sessions));
      download(res, pdf, 'application/pdf', fileName);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/report/recipients',
    summary: 'Who the report can be sent to: co-facilitators and observers (a link), participants who left an address (the PDF)',
    tag,
    access: access.workshop(EDIT_ROLES),
    params: WorkshopParams,
    response: ReportRecipients,
    handler: ({ params }) => report.recipients(params.workshopId),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/report/send',
    summary: 'E-mail the report: a link to chosen members, the PDF (names removed) to chosen participants who left an address',
    tag,
    access: access.workshop(EDIT_ROLES),
    params: WorkshopParams,
    body: SendReportBody,
    response: SendReportAnswer,
    handler: ({ params, body, caller }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return report.send(params.workshopId, body, caller.user, mailLinkBase(app.config));
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/retention',
    summary: 'What personal data the workshop still holds (names, addresses, photos) and when it is deleted',
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    response: RetentionStatus,
    handler: ({ params }) => retention.status(params.workshopId),
  });

  routes.add({
    method: 'put',
    path: '/workshops/:workshopId/retention',
    summary: 'Delete personal data automatically this many days after the last live session ended (`null`: keep until deleted)',
    tag,
    access: access.workshop(OWNER_ROLES),
    params: WorkshopParams,
    body: RetentionBody,
    response: RetentionStatus,
    handler: ({ params, body }) => retention.setDays(params.workshopId, body.retentionDays),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/retention/delete-now',
    summary: 'Delete the personal data now: names become "Participant N", addresses and photos go; anonymous notes and tallies stay',
    tag,
    access: access.workshop(OWNER_ROLES),
    params: WorkshopParams,
    body: DeleteNowBody,
    response: RetentionStatus,
    handler: ({ params }) => retention.deleteNow(params.workshopId),
  });

  routes.add({
    method: 'get',
    path: '/participant/data',
    summary: "A participant's own data: name, photo consent, the address left for the report, how many notes",
    tag,
    access: access.participant,
    response: MyData,
    handler: ({ caller }) => {
      if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
      return retention.myData(caller.participantId, caller.sessionId);
    },
  });

  routes.add({
    method: 'put',
    path: '/participant/report-email',
    summary: 'A participant leaves an e-mail address to get the report (or takes it back with null)',
    tag,
    access: access.participant,
    body: ReportEmailBody,
    response: MyData,
    handler: ({ caller, body }) => {
      if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
      return retention.setReportEmail(caller.participantId, caller.sessionId, body.email);
    },
  });

  routes.add({
    method: 'delete',
    path: '/participant/notes',
    summary: 'A participant removes every note they wrote and every photo they took in the session',
    tag,
    access: access.participant,
    response: z.object({ removed: z.number().int(), photos: z.number().int() }),
    handler: ({ caller }) => {
      if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
      return retention.removeMyNotes(caller.participantId, caller.sessionId);
    },
  });
}
