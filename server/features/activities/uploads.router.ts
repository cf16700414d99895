import type { Request, RequestHandler, Response } from 'express';
import multer from 'multer';
import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, READ_ROLES } from '../../common/access';
import { AppError, because, errors, type Why } from '../../common/errors';
import type { AppContext } from '../../context';
import type { PhotosService, PhotoReader, PhotoSize } from './photos.service';
import { ACTIVITY_LIMITS, PhotoUploadAnswer, PhotoUploadFields } from '../../../shared/schemas/activities';

const PhotoParams = z.object({ photoId: z.string().min(1).max(64) });
const WorkshopPhotoParams = PhotoParams.extend({ workshopId: z.string().min(1).max(64) });
const PhotoQuery = z.object({ size: z.enum(['thumb', 'full']).default('thumb') });

/** What multer's refusals mean to the person holding the phone. */
const MULTER_MESSAGES: Record<string, [number, AppError['code'], string, Why]> = {
  LIMIT_FILE_SIZE: [
    413,
    'payload_too_large',
    `That photo is larger than ${ACTIVITY_LIMITS.photoBytes / 1024 / 1024} MB; take it again at a smaller size`,
    because('photo_too_large', { mb: ACTIVITY_LIMITS.photoBytes / 1024 / 1024 }),
  ],
  LIMIT_FILE_COUNT: [400, 'bad_request', 'Send one photo at a time', because('photo_one_at_a_time')],
  LIMIT_UNEXPECTED_FILE: [400, 'bad_request', 'Send one photo at a time, as the field “photo”', because('photo_one_at_a_time')],
};

/**
 * Reads one photo into memory (never to disk) with Cairn's limits; multer is set up for this route
 * alone, so no other route accepts multipart bodies.
 */
function photoParser(): RequestHandler {
  const parse = multer({
    storage: multer.memoryStorage(),
    limits: { fileSize: ACTIVITY_LIMITS.photoBytes, files: 1, fields: 8, fieldSize: 2048, parts: 10 },
  }).single('photo');
  return (req, res, next) => {
    parse(req, res, (err: unknown) => {
      if (!err) return next();
      if (err instanceof multer.MulterError) {
        const [status, code, message, why] = MULTER_MESSAGES[err.code] ?? [400, 'bad_request', 'The upload could not be read; try again', because('upload_unreadable')];
        return next(new AppError(status, code, message, undefined, why));
      }
      next(err);
    });
  };
}

/** Refuses anyone but a participant before the body is read, so no one else gets to send a file's bytes. */
function participantsOnly(ctx: AppContext): RequestHandler {
  return async (req, _res, next) => {
    const caller = await ctx.auth.callerOf(req);
    if (caller.kind === 'participant') return next();
    if (caller.kind === 'problem') {
      throw new AppError(401, caller.problem === 'expired' ? 'token_expired' : 'unauthenticated',
        caller.problem === 'expired' ? 'Your sign-in has expired; sign in again' : 'Your sign-in is not valid; sign in again');
    }
    throw errors.unauthenticated('Join the session first');
  };
}

/** Sends a photo's bytes: never cached, since consent can be withdrawn at any time. */
function sendPhoto(res: Response, photo: { data: Buffer; blurred: boolean }): void {
  res.set('Cache-Control', 'no-store').set('X-Cairn-Blurred', photo.blurred ? 'yes' : 'no').type('image/jpeg').send(photo.data);
}

/** The photo size a request asks for. */
function sizeOf(req: Request): PhotoSize {
  return PhotoQuery.parse(req.query ?? {}).size;
}

/**
 * Photos over HTTP: a phone uploads one (with a caption and whether it shows people), and the
 * session's screens read them back — phones and the projector (its display token) by the session
 * route, accounts of the workshop by the workshop route.
 */
export function uploadsRoutes(routes: ApiRoutes, ctx: AppContext, photos: PhotosService): void {
  const tag = 'activities';

  // A projector holding the session's display token reads the session's photos without an account.
  const displayPhoto: RequestHandler = async (req, res, next) => {
    const header = req.headers.authorization;
    const token = header?.startsWith('Bearer ') ? header.slice(7).trim() : undefined;
    const caller = await ctx.auth.callerOfToken(token);
    if (caller.kind !== 'display') return next();
    const params = PhotoParams.safeParse(req.params);
    if (!params.success) throw errors.notFound('photo');
    sendPhoto(res, await photos.read(params.data.photoId, { kind: 'display', sessionId: caller.sessionId }, sizeOf(req)));
  };

  routes.add({
    method: 'post',
    path: '/live/photos',
    summary:
      'A phone uploads a photo (multipart: `photo` — PNG, JPEG or WebP up to 8 MB — with itemId, clientId, caption, showsPeople, peopleConsent); a retried clientId answers with the first',
    tag,
    access: access.participant,
    response: PhotoUploadAnswer,
    status: 201,
    before: [participantsOnly(ctx), photoParser()],
    handler: async ({ req, res, caller }) => {
      if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
      const fields = PhotoUploadFields.safeParse(req.body ?? {});
      if (!fields.success) throw errors.validation(fields.error, 'The photo form');
      const answer = await photos.upload(caller.participantId, caller.sessionId, fields.data, (req as Request & { file?: Express.Multer.File }).file?.buffer);
      res.status(answer.duplicate ? 200 : 201).json(answer);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/live/photos/:photoId',
    summary: "A photo of the participant's session (`?size=thumb|full`); blurred unless everyone's consent is on record; a projector may use its display token",
    tag,
    access: access.participant,
    params: PhotoParams,
    query: PhotoQuery,
    produces: 'image/jpeg',
    before: [displayPhoto],
    handler: async ({ params, query, res, caller }) => {
      if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
      const reader: PhotoReader = { kind: 'participant', sessionId: caller.sessionId, participantId: caller.participantId };
      sendPhoto(res, await photos.read(params.photoId, reader, query.size));
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/photos/:photoId',
    summary: "A photo of the workshop's live sessions (`?size=thumb|full`), hidden ones included; blurred unless everyone's consent is on record",
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopPhotoParams,
    query: PhotoQuery,
    produces: 'image/jpeg',
    handler: async ({ params, query, res }) => {
      sendPhoto(res, await photos.read(params.photoId, { kind: 'account', workshopId: params.workshopId }, query.size));
      return undefined;
    },
  });
}
