import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access } from '../../common/access';
import { errors } from '../../common/errors';
import { toUser } from '../../common/accounts';
import type { UsersService } from './users.service';
import { AppSettings, CreateUserBody, UpdateUserBody, User } from '../../../shared/schemas/user';

const IdParams = z.object({ userId: z.string().min(1).max(64) });

/** The admin's account management and server settings. */
export function usersRoutes(routes: ApiRoutes, users: UsersService): void {
  const tag = 'accounts';
  const admin = access.global('admin');

  routes.add({
    method: 'get',
    path: '/users',
    summary: 'List every account',
    tag,
    access: admin,
    response: z.array(User),
    handler: async () => (await users.list()).map(toUser),
  });

  routes.add({
    method: 'post',
    path: '/users',
    summary: 'Create an account',
    tag,
    access: admin,
    body: CreateUserBody,
    response: User,
    status: 201,
    handler: async ({ body }) => toUser(await users.create(body)),
  });

  routes.add({
    method: 'patch',
    path: '/users/:userId',
    summary: "Change an account's name, role or disabled state",
    tag,
    access: admin,
    params: IdParams,
    body: UpdateUserBody,
    response: User,
    handler: async ({ caller, params, body }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return toUser(await users.update(caller.user, params.userId, body));
    },
  });

  routes.add({
    method: 'get',
    path: '/settings',
    summary: 'Server-wide settings',
    tag,
    access: admin,
    response: AppSettings.extend({ signupByConfig: z.boolean() }),
    handler: () => users.settings(),
  });

  routes.add({
    method: 'put',
    path: '/settings',
    summary: 'Change server-wide settings (open or close sign-up)',
    tag,
    access: admin,
    body: AppSettings,
    response: AppSettings.extend({ signupByConfig: z.boolean() }),
    handler: async ({ body }) => {
      await users.saveSettings(body);
      return users.settings();
    },
  });
}
