import { z } from 'zod';
import type { ApiRoutes, RouteMeta } from '../../common/route';
import { openApiDocument } from '../../common/route';
import { access } from '../../common/access';
import { errors } from '../../common/errors';
import type { AppContext } from '../../context';

/** Health, the API document and, in development, the dev inbox. */
export function systemRoutes(routes: ApiRoutes, app: AppContext, meta: RouteMeta[]): void {
  const tag = 'system';
  routes.add({
    method: 'get',
    path: '/health',
    summary: 'Is Cairn up, and at which schema version',
    tag,
    access: access.public,
    response: z.object({ ok: z.literal(true), schemaVersion: z.string() }),
    handler: () => ({ ok: true as const, schemaVersion: app.db.schemaVersion }),
  });

  routes.add({
    method: 'get',
    path: '/openapi.json',
    summary: 'This document: every REST route with its schemas and who may call it',
    tag,
    access: access.public,
    handler: () => openApiDocument(meta, app.db.schemaVersion),
  });

  routes.add({
    method: 'get',
    path: '/dev/mail',
    summary: 'Messages the local dev SMTP server received (development and tests only; admins, since they hold reset links)',
    tag,
    access: access.global('admin'),
    handler: () => {
      if (!app.mail.dev || app.config.nodeEnv === 'production') throw errors.notFound('dev_inbox');
      return { messages: [...app.mail.dev.messages].reverse() };
    },
  });
}
