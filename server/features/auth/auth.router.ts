import type { Request, Response } from 'express';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access } from '../../common/access';
import { AppError, errors } from '../../common/errors';
import type { AuthService } from './auth.service';
import { toUser } from './auth.service';
import type { UsersService } from '../users/users.service';
import {
  ChangePasswordBody,
  ResetConfirmBody,
  ResetRequestBody,
  SessionAnswer,
  SignInBody,
  SignUpBody,
  User,
} from '../../../shared/schemas/user';
import type { UserRow } from '../../db/models';
import type { AppContext } from '../../context';

/** Name of the HttpOnly cookie that carries the refresh token. */
export const REFRESH_COOKIE = 'cairn_refresh';

/** Limits sign-in and reset attempts per address and e-mail, so guessing a password is slow. */
function attemptLimiter(limit: number) {
  return rateLimit({
    windowMs: 10 * 60 * 1000,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${String((req.body as { email?: unknown })?.email ?? '').toLowerCase()}`,
    handler: (_req, res) => {
      res.status(429).json({ error: { code: 'rate_limited', message: 'Too many attempts; wait a few minutes and try again' } });
    },
  });
}

/** Issues the tokens of a session: the refresh token as an HttpOnly cookie, the access token in the answer. */
export function setSession(req: Request, res: Response, auth: AuthService, user: UserRow): SessionAnswer {
  const t = auth.issue(user);
  res.cookie(REFRESH_COOKIE, t.refresh, {
    httpOnly: true,
    sameSite: 'strict',
    secure: req.secure,
    path: '/api/auth',
    maxAge: 30 * 24 * 3600 * 1000,
  });
  return { accessToken: t.access, expiresInSec: t.expiresInSec, user: toUser(user) };
}

/** Sign-in, sign-up, refresh, sign-out, password change and reset. */
export function authRoutes(routes: ApiRoutes, app: AppContext, auth: AuthService, users: UsersService): void {
  const tag = 'auth';
  const limit = app.config.nodeEnv === 'production' ? 10 : 50;

  routes.add({
    method: 'get',
    path: '/auth/options',
    summary: 'What the sign-in page may offer (is sign-up open?)',
    tag,
    access: access.public,
    response: z.object({ signupOpen: z.boolean() }),
    handler: async () => ({ signupOpen: (await users.settings()).signupOpen }),
  });

  routes.add({
    method: 'post',
    path: '/auth/sign-in',
    summary: 'Sign in with e-mail and password',
    tag,
    access: access.public,
    before: [attemptLimiter(limit)],
    body: SignInBody,
    response: SessionAnswer,
    handler: async ({ req, res, body }) => setSession(req, res, auth, await auth.signIn(body.email, body.password)),
  });

  routes.add({
    method: 'post',
    path: '/auth/sign-up',
    summary: 'Create a facilitator account (only while sign-up is open)',
    tag,
    access: access.public,
    before: [attemptLimiter(limit)],
    body: SignUpBody,
    response: SessionAnswer,
    status: 201,
    handler: async ({ req, res, body }) => {
      if (!(await users.settings()).signupOpen) {
        throw new AppError(403, 'signup_closed', 'Sign-up is closed here; ask your Cairn admin for an account');
      }
      const user = await auth.createUser({ ...body, role: 'facilitator' });
      return setSession(req, res, auth, user);
    },
  });

  routes.add({
    method: 'post',
    path: '/auth/refresh',
    summary: 'Exchange the refresh cookie for a new access token',
    tag,
    access: access.public,
    response: SessionAnswer,
    handler: async ({ req, res }) => setSession(req, res, auth, await auth.fromRefresh(req.cookies?.[REFRESH_COOKIE])),
  });

  routes.add({
    method: 'post',
    path: '/auth/sign-out',
    summary: 'Sign out: ends every session of the account and clears the cookie',
    tag,
    access: access.public,
    handler: async ({ req, res }) => {
      const user = await auth.fromRefresh(req.cookies?.[REFRESH_COOKIE]).catch(() => null);
      if (user) await auth.signOutEverywhere(user);
      res.clearCookie(REFRESH_COOKIE, { path: '/api/auth' });
      return undefined;
    },
  });

  routes.add({
    method: 'get',
    path: '/auth/me',
    summary: 'The signed-in account',
    tag,
    access: access.signedIn,
    response: User,
    handler: ({ caller }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      return toUser(caller.user);
    },
  });

  routes.add({
    method: 'post',
    path: '/auth/password',
    summary: 'Change the password (other sessions are signed out)',
    tag,
    access: access.signedIn,
    body: ChangePasswordBody,
    response: SessionAnswer,
    handler: async ({ req, res, caller, body }) => {
      if (caller.kind !== 'user') throw errors.unauthenticated();
      const user = await auth.changePassword(caller.user, body.currentPassword, body.newPassword);
      return setSession(req, res, auth, user);
    },
  });

  routes.add({
    method: 'post',
    path: '/auth/password-reset',
    summary: 'E-mail a password-reset link (answers the same whether or not the account exists)',
    tag,
    access: access.public,
    before: [attemptLimiter(limit)],
    body: ResetRequestBody,
    status: 202,
    response: z.object({ sent: z.literal(true) }),
    handler: async ({ req, body }) => {
      const started = await auth.startReset(body.email);
      if (started) {
        const link = `${publicBase(app, req)}/reset-password?token=${encodeURIComponent(started.token)}`;
        await app.mail.send({
          to: started.user.email,
          subject: 'Reset your Cairn password',
          text:
            `Hello ${started.user.name},\n\nSomeone asked to reset the password of your Cairn account. ` +
            `If it was you, open this link within an hour:\n\n${link}\n\nIf it was not you, ignore this message; your password stays as it is.\n`,
        });
      }
      return { sent: true as const };
    },
  });

  routes.add({
    method: 'post',
    path: '/auth/password-reset/confirm',
    summary: 'Set a new password with the one-time link token',
    tag,
    access: access.public,
    body: ResetConfirmBody,
    handler: async ({ body }) => {
      await auth.confirmReset(body.token, body.newPassword);
      return undefined;
    },
  });
}

/** The base URL that links in e-mails point to: PUBLIC_URL, else the address the request came to. */
export function publicBase(app: AppContext, req: Request): string {
  if (app.config.publicUrl) return app.config.publicUrl.replace(/\/$/, '');
  return `${req.protocol}://${req.get('host')}`;
}
