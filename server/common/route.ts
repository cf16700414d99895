import express, { type Request, type Response, type Router } from 'express';
import { z } from 'zod';
import { AppError, errors } from './errors';
import { describeAccess, type Access, type WorkshopAccessRole } from './access';
import type { AppContext, Caller } from '../context';

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';

/** What a handler receives: the parsed input, the caller and the app's services. */
export interface HandlerContext<P, Q, B> {
  req: Request;
  res: Response;
  params: P;
  query: Q;
  body: B;
  caller: Caller;
  /** The caller's role on the workshop, for workshop routes. */
  workshopRole: WorkshopAccessRole | null;
  app: AppContext;
}

/** A declared API route: its path, who may call it, its schemas and its handler. */
export interface RouteDef<P extends z.ZodType, Q extends z.ZodType, B extends z.ZodType> {
  method: Method;
  path: string;
  summary: string;
  tag: string;
  access: Access;
  params?: P;
  query?: Q;
  body?: B;
  response?: z.ZodType;
  /** HTTP status of a success (default 200). */
  status?: number;
  /** Set for routes that answer something else than JSON (files, CSV). */
  produces?: string;
  /** Extra middleware run before parsing (e.g. a per-route upload parser or rate limit). */
  before?: express.RequestHandler[];
  handler: (ctx: HandlerContext<z.infer<P>, z.infer<Q>, z.infer<B>>) => Promise<unknown> | unknown;
}

/** A route's description kept for the OpenAPI document. */
export interface RouteMeta {
  method: Method;
  path: string;
  summary: string;
  tag: string;
  access: Access;
  params?: z.ZodType;
  query?: z.ZodType;
  body?: z.ZodType;
  response?: z.ZodType;
  status: number;
  produces?: string;
}

/** Collects Cairn's REST routes: mounts each on an Express router and remembers it for the API document. */
export class ApiRoutes {
  readonly router: Router = express.Router();
  readonly meta: RouteMeta[] = [];
  /**
   * One router for each first segment of a path (`/workshops/:id` goes on the `workshops` one): Express tries
   * a request's path against each route in turn, so with every route on one router a phone's join was
   * matched against the fifty routes declared before it. Routes of different first segments never match the
   * same path, and within a segment the order of declaration is kept.
   */
  private segments = new Map<string, Router>();

  constructor(private app: AppContext) {}

  /** Declares a route; the access check and input parsing run before the handler. */
  add<P extends z.ZodType = z.ZodAny, Q extends z.ZodType = z.ZodAny, B extends z.ZodType = z.ZodAny>(
    def: RouteDef<P, Q, B>,
  ): void {
    this.meta.push({
      method: def.method,
      path: def.path,
      summary: def.summary,
      tag: def.tag,
      access: def.access,
      params: def.params,
      query: def.query,
      body: def.body,
      response: def.response,
      status: def.status ?? 200,
      produces: def.produces,
    });
    const app = this.app;
    const { router, path } = this.routerOf(def.path);
    router[def.method](path, ...(def.before ?? []), async (req: Request, res: Response) => {
      const caller = await app.auth.callerOf(req);
      const workshopRole = await authorise(app, def.access, caller, req);
      const parse = <T extends z.ZodType>(schema: T | undefined, value: unknown, what: string) => {
        if (!schema) return value;
        const r = schema.safeParse(value ?? {});
        if (!r.success) throw errors.validation(r.error, what);
        return r.data;
      };
      const params = parse(def.params, req.params, 'The address');
      const query = parse(def.query, req.query, 'The query');
      const body = parse(def.body, req.body, 'The form');
      const result = await def.handler({
        req,
        res,
        params: params as z.infer<P>,
        query: query as z.infer<Q>,
        body: body as z.infer<B>,
        caller,
        workshopRole,
        app,
      });
      if (res.headersSent) return;
      if (result === undefined) {
        res.status(def.status ?? 204).end();
        return;
      }
      res.status(def.status ?? 200).json(result);
    });
  }

  /** The router of a path's first segment and the path within it; every API path starts with a fixed segment. */
  private routerOf(path: string): { router: Router; path: string } {
    const m = /^\/([A-Za-z0-9._-]+)(\/.*)?$/.exec(path);
    // A first segment that is a parameter would match beside the other segments' routers, out of declaration order.
    if (!m) throw new Error(`An API path starts with a fixed segment: ${path}`);
    const [, segment, rest] = m as unknown as [string, string, string | undefined];
    let router = this.segments.get(segment);
    if (!router) {
      router = express.Router();
      this.segments.set(segment, router);
      this.router.use(`/${segment}`, router);
    }
    return { router, path: rest ?? '/' };
  }
}

/** Enforces a route's access declaration and returns the caller's workshop role where relevant. */
async function authorise(app: AppContext, a: Access, caller: Caller, req: Request): Promise<WorkshopAccessRole | null> {
  if (a.kind === 'public') return null;
  if (caller.kind === 'problem') {
    throw new AppError(401, caller.problem === 'expired' ? 'token_expired' : 'unauthenticated',
      caller.problem === 'expired' ? 'Your sign-in has expired; sign in again' : 'Your sign-in is not valid; sign in again');
  }
  if (a.kind === 'participant') {
    if (caller.kind !== 'participant') throw errors.unauthenticated('Join the session first');
    return null;
  }
  if (caller.kind !== 'user') throw errors.unauthenticated();
  if (a.kind === 'signedIn') return null;
  if (a.kind === 'global') {
    if (!a.roles.includes(caller.user.role)) throw errors.forbidden();
    return null;
  }
  const workshopId = String(req.params[a.param] ?? '');
  const role = await app.workshopRoleOf(caller.user, workshopId);
  if (role === 'missing') throw errors.notFound('workshop');
  if (!role || !a.roles.includes(role)) throw errors.forbidden();
  return role;
}

/** Builds the OpenAPI 3.1 document of every declared route from its zod schemas. */
export function openApiDocument(meta: RouteMeta[], version: string): unknown {
  const schema = (s: z.ZodType, io: 'input' | 'output') =>
    z.toJSONSchema(s, { io, unrepresentable: 'any', target: 'draft-2020-12' });
  const paths: Record<string, Record<string, unknown>> = {};
  for (const m of meta) {
    const path = '/api' + m.path.replace(/:([A-Za-z]+)/g, '{$1}');
    const parameters: unknown[] = [];
    for (const [, name] of m.path.matchAll(/:([A-Za-z]+)/g)) {
      parameters.push({ name, in: 'path', required: true, schema: { type: 'string' } });
    }
    if (m.query instanceof z.ZodObject) {
      for (const [name, s] of Object.entries(m.query.shape as Record<string, z.ZodType>)) {
        parameters.push({ name, in: 'query', required: !s.safeParse(undefined).success, schema: schema(s, 'input') });
      }
    }
    const op: Record<string, unknown> = {
      summary: m.summary,
      tags: [m.tag],
      description: `Who may call: ${describeAccess(m.access)}.`,
      'x-cairn-access': m.access,
      parameters,
      responses: {
        [String(m.status)]: {
          description: 'Success',
          ...(m.response
            ? { content: { 'application/json': { schema: schema(m.response, 'output') } } }
            : m.produces
              ? { content: { [m.produces]: {} } }
              : {}),
        },
        '4XX': { description: 'Error: `{ error: { code, message, fields? } }`' },
      },
    };
    if (m.access.kind !== 'public') op.security = [{ bearer: [] }];
    if (m.body) op.requestBody = { required: true, content: { 'application/json': { schema: schema(m.body, 'input') } } };
    (paths[path] ??= {})[m.method] = op;
  }
  return {
    openapi: '3.1.0',
    info: { title: 'Cairn API', version },
    components: { securitySchemes: { bearer: { type: 'http', scheme: 'bearer', bearerFormat: 'JWT' } } },
    paths,
  };
}
