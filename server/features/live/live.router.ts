import type { Request, RequestHandler, Response } from 'express';
import { ipKeyGenerator } from 'express-rate-limit';
import { limitRequests, requestLimit } from '../../common/http-rate-limit';
import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access, EDIT_ROLES, READ_ROLES } from '../../common/access';
import { errors } from '../../common/errors';
import type { AppContext } from '../../context';
import type { LiveService } from './live.service';
import type { PresenceService } from './presence.service';
import { JoinAnswer, JoinBody, JoinCode, JoinInfo, LiveSessionInfo, StartLiveBody } from '../../../shared/schemas/live';

const WorkshopParams = z.object({ workshopId: z.string().min(1).max(64) });
const CodeParams = z.object({ code: JoinCode });

/** Window of the join rate limits. */
const JOIN_WINDOW_MS = 10 * 60_000;
/** Failed join-code lookups one phone may make per window: plenty for typos, far too few to guess one of ~2.75e10 codes. */
const FAILED_LOOKUPS_PER_DEVICE = 20;
/** Failed lookups per window from a caller that names no device (scripts; Cairn's phones always send one), keyed by address. */
const FAILED_LOOKUPS_WITHOUT_DEVICE = 100;
/**
 * Failed lookups per window from one address, whatever device ids it sends: room for a whole room's
 * typos behind one address (a venue's NAT), and still about 29,000 guesses a day at most against
 * ~2.75e10 codes (JOIN_CODE_LENGTH characters from JOIN_CODE_ALPHABET).
 */
const FAILED_LOOKUPS_PER_ADDRESS = 200;
/** Joins of one code per window from one device: a phone reloads and rejoins now and then, never this often. */
const JOINS_PER_CODE_AND_DEVICE = 60;

/** The phone's own id: `deviceId` of the body, or the `X-Cairn-Device` header. */
function deviceOf(req: Request): string | null {
  const fromBody = (req.body as { deviceId?: unknown } | undefined)?.deviceId;
  const id = typeof fromBody === 'string' ? fromBody : req.get('X-Cairn-Device');
  return id && id.length >= 8 && id.length <= 64 ? id : null;
}

/** Sends a QR code PNG. */
function sendPng(res: Response, png: Buffer): void {
  // The code changes when a new session starts, so the image is never reused from a cache.
  res.set('Cache-Control', 'no-store').type('image/png').send(png);
}

/**
 * The live session over HTTP: start, read and stop it, its join QR code, and joining from a phone.
 * The socket commands are in live.socket.ts.
 */
export function liveRoutes(routes: ApiRoutes, ctx: AppContext, live: LiveService, presence: PresenceService): void {
  const tag = 'live';

  const codeOf = (req: Request) => {
    const code = JoinCode.safeParse(req.params.code ?? '');
    return code.success ? code.data : String(req.params.code);
  };
  const address = (req: Request) => ipKeyGenerator(req.ip ?? '');
  // The join limits, each declared once; one middleware checks those of a route in this order (see limitRequests).
  // Per device, not per address: a whole room shares one address behind the venue's Wi-Fi.
  // Only failures count (unknown or ended codes, bad bodies), so a phone that joins is never held back.
  const perDevice = requestLimit({
    name: 'tries-device',
    windowMs: JOIN_WINDOW_MS,
    limit: (req) => (deviceOf(req) ? FAILED_LOOKUPS_PER_DEVICE : FAILED_LOOKUPS_WITHOUT_DEVICE),
    failuresOnly: true,
    key: (req) => {
      const device = deviceOf(req);
      return device ? `device:${device}` : `address:${address(req)}`;
    },
    message: 'Too many tries from this phone; wait a few minutes, then check the code on the room’s screen',
    reason: 'join_tries_phone',
  });
  // A new device id with every guess must not escape the limit: the address holds whatever the device says.
  const perAddress = requestLimit({
    name: 'tries-address',
    windowMs: JOIN_WINDOW_MS,
    limit: () => FAILED_LOOKUPS_PER_ADDRESS,
    failuresOnly: true,
    key: (req) => `address:${address(req)}`,
    message: 'Too many tries from this network; wait a few minutes, then check the code on the room’s screen',
    reason: 'join_tries_network',
  });
  // Each address gets its own share of a code's joins (JOINS_PER_CODE, 2,000 by default: a room of up
  // to 1,000 phones behind one venue address, each rejoining now and then), so one sender making up
  // device ids uses up its own share only and phones on other addresses still join.
  const perCodeAndAddress = requestLimit({
    name: 'joins-address',
    windowMs: JOIN_WINDOW_MS,
    limit: () => ctx.config.joinsPerCode,
    key: (req) => `code:${codeOf(req)}:address:${address(req)}`,
    message: 'Too many people are joining this workshop right now; try again in a minute',
    reason: 'join_crowded',
  });
  // …and each device its own share, so rejoins from one phone cannot crowd its neighbours out either.
  const perCodeAndDevice = requestLimit({
    name: 'joins-device',
    windowMs: JOIN_WINDOW_MS,
    limit: () => Math.min(JOINS_PER_CODE_AND_DEVICE, ctx.config.joinsPerCode),
    // A caller without a device id gets no device share; the address share holds it.
    key: (req) => {
      const device = deviceOf(req);
      return device === null ? null : `code:${codeOf(req)}:device:${device}`;
    },
    message: 'This phone has joined too often; wait a few minutes and try again',
    reason: 'join_too_often',
  });
  const lookupLimits = limitRequests([perAddress, perDevice]);
  const joinLimits = limitRequests([perAddress, perDevice, perCodeAndAddress, perCodeAndDevice]);

  // A projector holding the session's display token gets the QR code without an account; others go on to the role check.
  const displayQr: RequestHandler = async (req, res, next) => {
    const header = req.headers.authorization;
    const candidates = [
      typeof req.query.display === 'string' ? req.query.display : undefined,
      header?.startsWith('Bearer ') ? header.slice(7).trim() : undefined,
    ];
    for (const token of candidates) {
      if (!token) continue;
      const caller = await ctx.auth.callerOfToken(token);
      if (caller.kind !== 'display') continue;
      if (!(await live.sessionBelongsTo(caller.sessionId, String(req.params.workshopId)))) throw errors.forbidden();
      sendPng(res, await live.joinQrPng(String(req.params.workshopId)));
      return;
    }
    next();
  };

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/live',
    summary: 'Start a live session, a rehearsal or the day (`kind`, the day when not given) (201), or get the one already live (200)',
    tag,
    access: access.workshop(EDIT_ROLES),
    params: WorkshopParams,
    body: StartLiveBody,
    response: LiveSessionInfo,
    status: 201,
    handler: async ({ params, body, res }) => {
      const { info, created } = await live.start(params.workshopId, body.kind);
      res.status(created ? 201 : 200).json(info);
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/live',
    summary: "The workshop's live session, or null when none is live",
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    response: LiveSessionInfo.nullable(),
    handler: ({ params }) => live.current(params.workshopId),
  });

  routes.add({
    method: 'post',
    path: '/workshops/:workshopId/live/stop',
    summary: 'End the live session: phones can no longer submit; everything submitted stays with the workshop',
    tag,
    access: access.workshop(EDIT_ROLES),
    params: WorkshopParams,
    response: LiveSessionInfo,
    handler: ({ params }) => live.stop(params.workshopId),
  });

  routes.add({
    method: 'get',
    path: '/workshops/:workshopId/live/qr.png',
    summary: "The live session's join link as a QR code (PNG); a projector may also use its display token (`?display=` or bearer)",
    tag,
    access: access.workshop(READ_ROLES),
    params: WorkshopParams,
    produces: 'image/png',
    before: [displayQr],
    handler: async ({ params, res }) => {
      sendPng(res, await live.joinQrPng(params.workshopId));
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/join/:code',
    summary: 'What a phone may see of a live session before joining it (title and data policy)',
    tag,
    access: access.public,
    params: CodeParams,
    response: JoinInfo,
    before: [lookupLimits],
    handler: ({ params }) => presence.joinInfo(params.code),
  });

  routes.add({
    method: 'post',
    path: '/join/:code',
    summary: 'Join a live session from a phone with a display name and photo consent; the same device gets the same participant back',
    tag,
    access: access.public,
    params: CodeParams,
    body: JoinBody,
    response: JoinAnswer,
    before: [joinLimits],
    handler: ({ params, body }) => presence.join(params.code, body),
  });
}
