import express from 'express';
import http from 'node:http';
import path from 'node:path';
import fs from 'node:fs';
import helmet from 'helmet';
import cookieParser from 'cookie-parser';
import compression from 'compression';
import { pino, type DestinationStream, type Logger } from 'pino';
import { pinoHttp } from 'pino-http';
import { Server } from 'socket.io';
import type { Config } from './config/env';
import { openDatabase } from './db';
import { seedDemo } from './db/seed';
import { TokenService } from './common/tokens';
import { ApiRoutes } from './common/route';
import { errorHandler, notFoundHandler } from './common/errors';
import { builtInlineScriptSources, hashedAssets, serveClient } from './common/client-assets';
import type { AppContext } from './context';
import { Mailer } from './features/mail/mail.service';
import { AuthService } from './features/auth/auth.service';
import { authRoutes } from './features/auth/auth.router';
import { UsersService } from './features/users/users.service';
import { usersRoutes } from './features/users/users.router';
import { WorkshopsService } from './features/workshops/workshops.service';
import { activityPhotos } from './features/results/retention.service';
import { workshopsRoutes } from './features/workshops/workshops.router';
import { systemRoutes } from './features/system/system.router';
import { MembersService } from './features/members/members.service';
import { membersRoutes } from './features/members/members.router';
import { registerClockSocket } from './features/clock/clock.socket';
import { ParticipantSockets, limitSocketEvents } from './common/socket-rate-limit';
import { shareBroadcasts } from './common/scale-out';
import { Announcer } from './common/announcer';
import { LiveService } from './features/live/live.service';
import { PresenceService } from './features/live/presence.service';
import { SubmissionsService } from './features/live/submissions.service';
import { liveRoutes } from './features/live/live.router';
import { sessionsRoutes } from './features/live/sessions.router';
import { SessionsService } from './features/live/sessions.service';
import { liveSessions, registerLiveCommands, watchAccountChanges } from './features/live/live.socket';
import { SocketCommands } from './common/command';
import { TeamsService } from './features/teams/teams.service';
import { registerTeamsSocket } from './features/teams/teams.socket';
import { PagesService } from './features/live/pages.service';
import { registerPagesSocket } from './features/live/pages.socket';
import { ActivitiesService } from './features/activities/activities.service';
import { ModerationService } from './features/activities/moderation.service';
import { RoundsService } from './features/activities/rounds.service';
import { registerActivitiesSocket } from './features/activities/activities.socket';
import { PhotosService } from './features/activities/photos.service';
import { uploadsRoutes } from './features/activities/uploads.router';
import { VotingService } from './features/voting/voting.service';
import { VoteSourcesService } from './features/voting/vote-sources.service';
import { votingRoutes } from './features/voting/voting.router';
import { registerVotingSocket } from './features/voting/voting.socket';
import { ResultsService } from './features/results/results.service';
import { ReportService } from './features/results/report.service';
import { RetentionService } from './features/results/retention.service';
import { resultsRoutes } from './features/results/results.router';
import type { ClientToServerEvents, ServerToClientEvents, SocketData } from '../shared/events';
import { installMessages } from '../shared/schemas/messages';

// Every validation message written for a person, before any schema parses.
installMessages();

/** A built Cairn app: Express and socket.io on one HTTP server that is not listening yet. */
export interface CairnApp {
  express: express.Express;
  server: http.Server;
  io: Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>;
  ctx: AppContext;
  /** The socket command registry (its `list()` names every command and whether a handler serves it). */
  commands: SocketCommands;
  /** Closes sockets, the HTTP server, mail and the database. */
  close(): Promise<void>;
}

/** Whether a socket handshake's Origin is the page's own host or one listed in CORS_ORIGINS; unparsable origins (`null`) are refused. */
export function originAllowed(origin: string, host: string | undefined, allowed: string[]): boolean {
  if (allowed.includes(origin)) return true;
  try {
    return host !== undefined && new URL(origin).host === host;
  } catch {
    return false;
  }
}

/**
 * Creates the data folder and narrows it and its upload folder to their owner (mode 700): they hold
 * names, e-mail addresses, photos of people and the signing secret.
 */
export function keepDataFolderPrivate(config: Config): void {
  fs.mkdirSync(config.dataDir, { recursive: true, mode: 0o700 });
  for (const dir of [config.dataDir, config.uploadDir]) {
    if (fs.existsSync(dir)) fs.chmodSync(dir, 0o700);
  }
}

/** Log fields that carry credentials (bearer tokens, refresh cookies), hidden by pino's `redact`. */
export const LOG_REDACT_PATHS = [
  'req.headers.authorization',
  'req.headers.cookie',
  'res.headers["set-cookie"]',
  'headers.authorization',
  'headers.cookie',
  '*.token',
  '*.accessToken',
  '*.password',
];

/** Query parameters that carry a credential (display tokens in QR links, reset and invitation tokens). */
const SECRET_PARAMS = /^(display|token|access_token|t)$/i;

/**
 * A request URL for the log, with the values of credential query parameters hidden.
 * @example redactUrl('/projector/abc?display=eyJ...') // '/projector/abc?display=[hidden]'
 */
export function redactUrl(url: string): string {
  const q = url.indexOf('?');
  if (q < 0) return url;
  const params = url
    .slice(q + 1)
    .split('&')
    .map((pair) => {
      const [name = ''] = pair.split('=', 1);
      let decoded = name;
      try {
        decoded = decodeURIComponent(name);
      } catch {
        // A malformed name is logged as sent.
      }
      return SECRET_PARAMS.test(decoded) ? `${name}=[hidden]` : pair;
    });
  return `${url.slice(0, q)}?${params.join('&')}`;
}

/** Cairn's logger: pino at a level, credentials hidden (see {@link LOG_REDACT_PATHS}); to stdout unless a stream is given. */
export function createLogger(level: Config['logLevel'], stream?: DestinationStream): Logger {
  // Whatever logs a request or its headers: credentials never reach the log.
  return pino({ level, redact: { paths: LOG_REDACT_PATHS, censor: '[hidden]' } }, stream);
}

/** A request's path as the client asked for it: Express shortens `url` while a mounted router handles the request. */
function pathAsked(req: { url?: string; originalUrl?: string }): string {
  return req.originalUrl ?? req.url ?? '';
}

/** Logs one short line a request at info (method, path with credentials hidden, status, time), errors at error; never headers. */
export function requestLogger(logger: Logger, autoLogging: boolean) {
  return pinoHttp({
    logger,
    autoLogging,
    serializers: {
      req: (req: { method?: string; url?: string; originalUrl?: string }) => ({ method: req.method, url: redactUrl(pathAsked(req)) }),
      res: (res: { statusCode?: number }) => ({ statusCode: res.statusCode }),
    },
    customSuccessMessage: (req, res, ms) => `${req.method} ${redactUrl(pathAsked(req))} ${res.statusCode} ${Math.round(ms)} ms`,
    customErrorMessage: (req, res) => `${req.method} ${redactUrl(pathAsked(req))} ${res.statusCode} failed`,
    customLogLevel: (_req, res, err) => (err || res.statusCode >= 500 ? 'error' : 'info'),
  });
}

/** Where the built client lives. */
const DIST_DIR = path.resolve(import.meta.dirname, '..', 'dist');

/**
 * Builds Cairn: opens and migrates the database, seeds the demo on first start, wires every route
 * and socket handler. Never listens; `index.ts` does, and tests use the returned server.
 */
export async function createApp(config: Config): Promise<CairnApp> {
  const logger = createLogger(config.logLevel);
  keepDataFolderPrivate(config);
  const db = await openDatabase(config.databasePath);
  if (config.seedDemo) {
    if (await seedDemo(db)) logger.info('seeded the demo workshop');
  }
  const tokens = new TokenService(config.jwtSecret, config.accessTokenTtlSec);
  const mail = await Mailer.create({ smtpUrl: config.smtpUrl, from: config.mailFrom, devPort: config.devSmtpPort });
  const auth = new AuthService(db, tokens);
  const users = new UsersService(db, config.allowSignup);
  // Deleting a workshop also deletes its photos' files (after the commit).
  const workshops = new WorkshopsService(db, (sessionIds, t) => activityPhotos.erase(ctx, sessionIds, t));
  // Built before the services, which announce through it; socket.io is attached to it once it exists.
  const announcer = new Announcer(logger);
  const ctx: AppContext = {
    config,
    db,
    tokens,
    mail,
    logger,
    announcer,
    auth,
    workshopRoleOf: (user, workshopId) => workshops.roleOf(user, workshopId),
    accountRoleOf: (userId, workshopId, tokenVersion) => workshops.roleOfAccount(userId, workshopId, tokenVersion),
  };

  const app = express();
  app.disable('x-powered-by');
  app.set('trust proxy', 'loopback');
  const hasClient = fs.existsSync(path.join(DIST_DIR, 'index.html'));
  if (hasClient) app.use(hashedAssets(DIST_DIR));
  app.use(
    helmet({
      contentSecurityPolicy: {
        directives: {
          defaultSrc: ["'self'"],
          // The built HTML's own inline script (the phone's first-screen painter) by its hash, no other.
          scriptSrc: ["'self'", ...(hasClient ? builtInlineScriptSources(DIST_DIR) : [])],
          // Quasar sets inline styles on components.
          styleSrc: ["'self'", "'unsafe-inline'"],
          imgSrc: ["'self'", 'data:', 'blob:'],
          fontSrc: ["'self'", 'data:'],
          // CSP Level 3 lets 'self' match ws:/wss: on the page's own host and port (from memory of the spec's
          // source-matching rules; the e2e live test checks it in Chromium), so sockets reach Cairn and nothing else.
          connectSrc: ["'self'"],
          objectSrc: ["'none'"],
          frameAncestors: ["'none'"],
          upgradeInsecureRequests: null,
        },
      },
      // Phones reach a laptop at the venue over plain HTTP; HSTS would lock them out.
      strictTransportSecurity: config.publicUrl?.startsWith('https:') ?? false,
    }),
  );
  // One line a request, except in tests; when it would log nothing, it is not mounted at all (it makes a
  // child logger for every request, which a room of phones joining at once pays a thousand times).
  if (config.nodeEnv !== 'test' && config.logLevel !== 'silent') app.use(requestLogger(logger, true));
  // Dynamic answers (JSON, CSV, the report); the built client is compressed at build time (serveClient).
  app.use(compression());
  app.use(cookieParser());
  app.use('/api', express.json({ limit: '100kb' }));

  const routes = new ApiRoutes(ctx);
  systemRoutes(routes, ctx, routes.meta);
  authRoutes(routes, ctx, auth, async () => (await users.settings()).signupOpen);
  usersRoutes(routes, users);
  workshopsRoutes(routes, workshops);
  membersRoutes(routes, ctx, new MembersService(db, mail), auth);
  // The live session in three services: who is in the room, the session's state, and what the phones send in.
  const presence = new PresenceService(ctx);
  const live = new LiveService(ctx, presence);
  const submissions = new SubmissionsService(ctx, live);
  liveRoutes(routes, ctx, live, presence);
  sessionsRoutes(routes, new SessionsService(ctx));
  const activities = new ActivitiesService(ctx, live, presence, submissions);
  uploadsRoutes(routes, ctx, new PhotosService(ctx, live, presence, submissions));
  const voting = new VotingService(ctx, live, presence);
  votingRoutes(routes, voting);
  const results = new ResultsService(ctx, { votes: voting });
  const retention = new RetentionService(ctx);
  retention.afterRemoval = (sessionId) => {
    activities.everythingChanged(sessionId).catch((err: unknown) => ctx.logger.error({ err }, 'could not announce removed notes'));
  };
  resultsRoutes(routes, ctx, { results, report: new ReportService(ctx, results), retention });
  // Deletes personal data whose retention time has passed, checked periodically while Cairn runs.
  retention.start();
  app.use('/api', routes.router);
  app.use('/api', notFoundHandler);

  if (hasClient) serveClient(app, DIST_DIR);
  app.use(errorHandler);

  const server = http.createServer(app);
  const io = new Server<ClientToServerEvents, ServerToClientEvents, Record<string, never>, SocketData>(server, {
    maxHttpBufferSize: 256 * 1024,
    // The heartbeat every 25 s, socket.io's default (a phone that vanished without closing is counted
    // offline within 45 s): each one wakes every phone's radio and costs the server a write and a read
    // per phone. Every 10 s, they were about a third of the server's CPU between two activity changes at
    // 1,000 phones (npm run bench, 2026-12-03: 41.7 ms a round against 26.7 for a bare server at 25 s).
    pingInterval: 25_000,
    pingTimeout: 20_000,
    // Refuse handshakes from other sites: same origin as the page, or an origin listed in CORS_ORIGINS.
    allowRequest: (req, callback) => {
      const origin = req.headers.origin;
      if (!origin) return callback(null, true);
      const ok = originAllowed(origin, req.headers.host, config.corsOrigins);
      callback(ok ? null : 'origin not allowed', ok);
    },
  });
  io.use(async (socket, next) => {
    const token = (socket.handshake.auth as { token?: unknown })?.token;
    const caller = await auth.callerOfToken(typeof token === 'string' ? token : undefined);
    if (caller.kind === 'user') socket.data = { kind: 'user', userId: caller.user.id, tokenVersion: caller.user.tokenVersion };
    else if (caller.kind === 'participant') {
      socket.data = { kind: 'participant', participantId: caller.participantId, sessionId: caller.sessionId };
    } else if (caller.kind === 'display') socket.data = { kind: 'display', sessionId: caller.sessionId };
    else return next(new Error(caller.kind === 'problem' ? `token_${caller.problem}` : 'unauthenticated'));
    next();
  });
  // Several processes behind sticky sessions share broadcasts through Redis (docs/scaling.md).
  const stopSharing = config.redisUrl ? await shareBroadcasts(io, config.redisUrl) : null;
  announcer.attach(io, { shared: stopSharing !== null });
  watchAccountChanges(io, ctx);
  const teams = new TeamsService(ctx);
  voting.useTeams(teams);
  const pages = new PagesService(announcer);
  // Every socket command, declared in shared/events.ts, gets its handler once here.
  const commands = new SocketCommands(liveSessions(ctx, presence), ctx.logger);
  registerClockSocket(commands);
  registerLiveCommands(commands, ctx, { live, presence, submissions });
  registerTeamsSocket(commands, teams);
  registerActivitiesSocket(commands, {
    activities,
    moderation: new ModerationService(ctx, activities),
    rounds: new RoundsService(ctx, activities, presence),
  });
  registerVotingSocket(commands, voting, new VoteSourcesService(ctx), ctx);
  registerPagesSocket(commands, pages);
  const participantSockets = new ParticipantSockets();
  io.on('connection', (socket) => {
    // Facilitators' screens are trusted more than a room of phones, but every socket is throttled; a
    // participant's sockets are bounded in number and share one budget.
    if (socket.data.kind === 'participant' && socket.data.participantId) participantSockets.add(socket.data.participantId, socket);
    else limitSocketEvents(socket, { burst: 200, perSecond: 100 });
    commands.attach(socket);
  });

  return {
    express: app,
    server,
    io,
    ctx,
    commands,
    async close() {
      // First, so the disconnects below schedule no announcements against a closing database.
      announcer.close();
      live.close();
      presence.close();
      await retention.stop();
      io.disconnectSockets(true);
      await new Promise<void>((resolve) => io.close(() => resolve()));
      if (server.listening) await new Promise<void>((resolve) => server.close(() => resolve()));
      await stopSharing?.();
      await mail.close();
      await db.close();
    },
  };
}
