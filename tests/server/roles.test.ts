import { afterAll, describe, expect, it } from 'vitest';
import jwt from 'jsonwebtoken';
import type { Response } from 'supertest';
import { DEMO_ACCOUNTS } from '../../server/db/seed';
import type { Access } from '../../server/common/access';
import type { AgendaItem } from '../../shared/schemas/agenda-item';
import { addMember, bearer, createStranger, demoUserId, demoWorkshop, startTestApp, TEST_SECRET } from './helpers';

// Top-level await: the matrix is built from the live OpenAPI document, one test per route.
const t = await startTestApp();
afterAll(() => t.close());

type Method = 'get' | 'post' | 'put' | 'patch' | 'delete';
interface Operation {
  summary: string;
  description: string;
  'x-cairn-access': Access;
}
const doc = (await t.agent.get('/api/openapi.json')).body as { paths: Record<string, Partial<Record<Method, Operation>>> };
const routes = Object.entries(doc.paths).flatMap(([path, ops]) =>
  (Object.entries(ops) as [Method, Operation][]).map(([method, op]) => ({ method, path, op })),
);

/** Everyone the matrix calls each route as. */
const CALLERS = ['signedOut', 'expiredToken', 'stranger', 'observer', 'cofacilitator', 'admin', 'owner'] as const;
type CallerKey = (typeof CALLERS)[number];

const demo = await demoWorkshop(t);
const stranger = await createStranger(t, 'stranger');
const cofacilitator = await createStranger(t, 'cofacilitator');
await addMember(t, demo.id, cofacilitator.id, 'cofacilitator');
// A separate account whose refresh cookie the refresh route is called with, so no caller's session changes.
const refresher = await createStranger(t, 'refresher');
const refreshCookie = ([] as string[])
  .concat((await t.agent.post('/api/auth/sign-in').send({ email: refresher.email, password: refresher.password })).headers['set-cookie'] ?? [])
  .find((c) => c.startsWith('cairn_refresh='))!
  .split(';')[0];
const ownerId = await demoUserId(t, 'facilitator');
const observerId = await demoUserId(t, 'observer');

const tokens: Record<CallerKey, string | null> = {
  signedOut: null,
  expiredToken: jwt.sign({ kind: 'user', tv: 0 }, TEST_SECRET, { algorithm: 'HS256', subject: ownerId, expiresIn: -10 }),
  stranger: stranger.token,
  observer: await t.tokenFor('observer'),
  cofacilitator: cofacilitator.token,
  admin: await t.tokenFor('admin'),
  owner: await t.tokenFor('facilitator'),
};
const globalRole: Record<CallerKey, 'admin' | 'facilitator' | null> = {
  signedOut: null,
  expiredToken: null,
  stranger: 'facilitator',
  observer: 'facilitator',
  cofacilitator: 'facilitator',
  admin: 'admin',
  owner: 'facilitator',
};
const workshopRole: Record<CallerKey, 'owner' | 'cofacilitator' | 'observer' | 'admin' | null> = {
  signedOut: null,
  expiredToken: null,
  stranger: null,
  observer: 'observer',
  cofacilitator: 'cofacilitator',
  admin: 'admin',
  owner: 'owner',
};

/** What the server must answer: let the caller through, or refuse with 401 or 403. */
function expected(access: Access, who: CallerKey): 'allowed' | 401 | 403 {
  if (access.kind === 'public') return 'allowed';
  if (tokens[who] === null || who === 'expiredToken') return 401;
  switch (access.kind) {
    case 'signedIn':
      return 'allowed';
    case 'global':
      return access.roles.includes(globalRole[who]!) ? 'allowed' : 403;
    case 'workshop': {
      const role = workshopRole[who];
      return role && access.roles.includes(role) ? 'allowed' : 403;
    }
    case 'participant':
      // No account holds a participant token, so every caller here is refused as signed out.
      return 401;
  }
}

/** A workshop a call may change freely: a fresh full-day copy with the same people as the demo. */
async function freshWorkshop(): Promise<{ id: string; agenda: AgendaItem[] }> {
  const res = await t.agent
    .post('/api/workshops')
    .set('Authorization', bearer(tokens.owner!))
    .send({ title: 'Matrix workshop', objective: 'Check who may do what', date: '2027-04-01', headcount: 18, templateId: 'full-day' });
  if (res.status !== 201) throw new Error(`could not create a workshop: ${JSON.stringify(res.body)}`);
  await addMember(t, res.body.id, observerId, 'observer');
  await addMember(t, res.body.id, cofacilitator.id, 'cofacilitator');
  return { id: res.body.id, agenda: res.body.agenda };
}

interface Target {
  workshopId: string;
  item: AgendaItem;
  itemIds: string[];
}

/** A valid request where a route needs one; a route not listed here gets an empty body. */
const REQUESTS: Record<string, { body?: (x: Target) => unknown; cookie?: string }> = {
  'post /api/auth/sign-in': { body: () => ({ email: DEMO_ACCOUNTS.facilitator.email, password: DEMO_ACCOUNTS.facilitator.password }) },
  'post /api/auth/sign-up': { body: () => ({ email: unique('newcomer'), name: 'Ada Newcomer', password: 'a newcomer password' }) },
  'post /api/auth/refresh': { cookie: refreshCookie },
  // A wrong current password: the allowed caller gets 400 and keeps their session.
  'post /api/auth/password': { body: () => ({ currentPassword: 'not the current password', newPassword: 'an unused new password' }) },
  'post /api/auth/password-reset': { body: () => ({ email: 'nobody@harbourlane.example' }) },
  'post /api/auth/password-reset/confirm': { body: () => ({ token: 'not-a-real-reset-token', newPassword: 'an unused new password' }) },
  'post /api/users': { body: () => ({ email: unique('made-by-admin'), name: 'Lee Volunteer', role: 'facilitator', password: 'a volunteer password' }) },
  'patch /api/users/{userId}': { body: () => ({ name: 'Robin Renamed' }) },
  'put /api/settings': { body: () => ({ signupOpen: false }) },
  'post /api/workshops': { body: () => ({ title: 'Matrix check', objective: 'Who may create', date: '2027-04-01', headcount: 12 }) },
  'patch /api/workshops/{workshopId}': { body: () => ({ venueNotes: 'Moved to the upstairs room' }) },
  'post /api/workshops/{workshopId}/agenda': { body: () => ({ type: 'dot_vote' }) },
  'put /api/workshops/{workshopId}/agenda/{itemId}': {
    body: ({ item }) => {
      const { id: _id, ...input } = item;
      return { ...input, title: `${item.title} (renamed)` };
    },
  },
  'put /api/workshops/{workshopId}/agenda-order': { body: ({ itemIds }) => ({ ids: [...itemIds].reverse() }) },
  'put /api/workshops/{workshopId}/materials/packed': { body: () => ({ keys: ['dot_stickers'] }) },
};

let counter = 0;
function unique(label: string): string {
  counter += 1;
  return `${label}-${counter}@harbourlane.example`;
}

/** Calls one route as one caller; routes that change a workshop get a fresh one each call. */
async function call(method: Method, path: string, who: CallerKey): Promise<Response> {
  let target: Target = { workshopId: demo.id, item: undefined as unknown as AgendaItem, itemIds: demo.itemIds };
  if (path.includes('{workshopId}')) {
    if (method === 'get') {
      const w = await t.agent.get(`/api/workshops/${demo.id}`).set('Authorization', bearer(tokens.owner!));
      target = { workshopId: demo.id, item: w.body.agenda[0], itemIds: demo.itemIds };
    } else {
      const w = await freshWorkshop();
      target = { workshopId: w.id, item: w.agenda[0], itemIds: w.agenda.map((i) => i.id) };
    }
  }
  const url = path.replace(/\{(\w+)\}/g, (_m, name: string) => {
    if (name === 'workshopId') return target.workshopId;
    if (name === 'itemId') return target.item.id;
    if (name === 'userId') return stranger.id;
    return 'unknown';
  });
  const spec = REQUESTS[`${method} ${path}`] ?? {};
  let req = t.agent[method](url);
  const token = tokens[who];
  if (token) req = req.set('Authorization', bearer(token));
  if (spec.cookie) req = req.set('Cookie', spec.cookie);
  if (method !== 'get' && method !== 'delete') req = req.send((spec.body?.(target) ?? {}) as object);
  return req;
}

describe('who gets what: every route in the OpenAPI document, as every caller', () => {
  it('has routes to check', () => {
    expect(routes.length).toBeGreaterThanOrEqual(20);
  });

  describe.each(routes)('$method $path', ({ method, path, op }) => {
    const access = op['x-cairn-access'];
    it.each(CALLERS)(`as %s`, async (who) => {
      const res = await call(method, path, who);
      const want = expected(access, who);
      const seen = `${res.status} ${JSON.stringify(res.body?.error ?? '')}`;
      if (want === 'allowed') {
        expect(res.status, seen).toBeLessThan(500);
        expect(res.status, seen).not.toBe(401);
        // A 403 for an allowed caller may only be a rule of the route itself (e.g. signup_closed), never the role check.
        if (res.status === 403) expect(res.body.error.code, seen).not.toBe('forbidden');
      } else if (want === 401) {
        expect(res.status, seen).toBe(401);
        expect(res.body.error.code, seen).toBe(who === 'expiredToken' ? 'token_expired' : 'unauthenticated');
      } else {
        expect(res.status, seen).toBe(403);
        expect(res.body.error.code, seen).toBe('forbidden');
      }
    });
  });
});

describe('who gets what: the rules the matrix rests on', () => {
  const accessOf = (method: Method, path: string) => doc.paths[path]?.[method]?.['x-cairn-access'];

  it('keeps health, sign-in and the API document public', () => {
    expect(accessOf('get', '/api/health')).toEqual({ kind: 'public' });
    expect(accessOf('post', '/api/auth/sign-in')).toEqual({ kind: 'public' });
    expect(accessOf('get', '/api/openapi.json')).toEqual({ kind: 'public' });
  });

  it('keeps account management and settings for the admin', () => {
    for (const [m, p] of [['get', '/api/users'], ['post', '/api/users'], ['patch', '/api/users/{userId}'], ['get', '/api/settings'], ['put', '/api/settings']] as const) {
      expect(accessOf(m, p), `${m} ${p}`).toEqual({ kind: 'global', roles: ['admin'] });
    }
  });

  it('lets observers and the admin read a workshop, but only the owner and co-facilitators change it, and only the owner delete it', () => {
    const read = ['owner', 'cofacilitator', 'observer', 'admin'];
    const edit = ['owner', 'cofacilitator'];
    expect(accessOf('get', '/api/workshops/{workshopId}')).toMatchObject({ kind: 'workshop', roles: read });
    expect(accessOf('get', '/api/workshops/{workshopId}/materials')).toMatchObject({ kind: 'workshop', roles: read });
    expect(accessOf('patch', '/api/workshops/{workshopId}')).toMatchObject({ kind: 'workshop', roles: edit });
    expect(accessOf('put', '/api/workshops/{workshopId}/agenda-order')).toMatchObject({ kind: 'workshop', roles: edit });
    expect(accessOf('delete', '/api/workshops/{workshopId}')).toMatchObject({ kind: 'workshop', roles: ['owner'] });
  });

  it('answers 404, not 403, for a workshop that does not exist', async () => {
    const res = await t.agent.get('/api/workshops/no-such-workshop').set('Authorization', bearer(tokens.owner!));
    expect(res.status).toBe(404);
  });
});

describe('the OpenAPI document', () => {
  it('lists every route Express has mounted under /api', () => {
    // Express 5 keeps each router's routes as layers with `route.path` and `route.methods`, and a mounted
    // router as a layer whose `rawPath` is where it is mounted (the registry mounts one a first segment).
    type Layer = { rawPath?: string; route?: { path: string; methods: Record<string, boolean> }; handle?: { stack?: Layer[] } };
    const routesUnder = (prefix: string, layers: Layer[]): string[] =>
      layers.flatMap((l) => {
        if (l.route) {
          const path = `${prefix}${l.route.path === '/' && prefix ? '' : l.route.path}`;
          return Object.keys(l.route.methods).map((m) => `${m} ${path.replace(/:(\w+)/g, '{$1}')}`);
        }
        return l.handle?.stack && typeof l.rawPath === 'string' && l.rawPath !== '/' ? routesUnder(prefix + l.rawPath, l.handle.stack) : [];
      });
    const stack = (t.cairn.express as unknown as { router: { stack: Layer[] } }).router.stack;
    const mounted = routesUnder('', stack).filter((r) => r.split(' ')[1]!.startsWith('/api/'));
    expect(mounted.length).toBeGreaterThanOrEqual(20);
    const documented = routes.map((r) => `${r.method} ${r.path}`);
    expect(documented.sort()).toEqual([...new Set(mounted)].sort());
  });

  it('has at least the routes the client depends on', () => {
    expect(doc.paths['/api/health']?.get).toBeDefined();
    expect(doc.paths['/api/auth/sign-in']?.post).toBeDefined();
    expect(doc.paths['/api/workshops']?.get).toBeDefined();
    expect(doc.paths['/api/workshops']?.post).toBeDefined();
    expect(doc.paths['/api/workshops/{workshopId}/agenda']?.post).toBeDefined();
  });

  it('says for every route who may call it, in words and as x-cairn-access', () => {
    for (const { method, path, op } of routes) {
      const where = `${method} ${path}`;
      expect(op.summary, where).toMatch(/\S/);
      expect(op.description, where).toMatch(/^Who may call: .+\.$/);
      expect(['public', 'signedIn', 'global', 'workshop', 'participant'], where).toContain(op['x-cairn-access'].kind);
      if (op['x-cairn-access'].kind === 'workshop') {
        expect(path, where).toContain(`{${op['x-cairn-access'].param}}`);
        expect(op.description, where).toMatch(/on this workshop: /);
      }
    }
  });
});
