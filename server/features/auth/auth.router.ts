import type { Request, Response } from 'express';
import { rateLimit, ipKeyGenerator } from 'express-rate-limit';
import { z } from 'zod';
import type { ApiRoutes } from '../../common/route';
import { access } from '../../common/access';
import { AppError, errors } from '../../common/errors';
import type { AuthService } from './auth.service';
import { toUser } from '../../common/accounts';
import { REFRESH_COOKIE, clearSession, setSession } from '../../common/session-cookie';
import {
  ChangePasswordBody,
  ResetConfirmBody,
  ResetRequestBody,
  SessionAnswer,
  SignInBody,
  SignUpBody,
  User,
  normaliseEmail,
} from '../../../shared/schemas/user';
import { mailLinkBase } from '../../common/network';
import type { AppContext } from '../../context';

/** The e-mail address a request body names, in the one spelling accounts are looked up by (empty when none). */
function bodyEmail(req: Request): string {
  const email = (req.body as { email?: unknown } | undefined)?.email;
  return typeof email === 'string' ? normaliseEmail(email) : '';
}

/** Answers a request that went over a limit. */
function refuse(_req: Request, res: Response): void {
  res.status(429).json({ error: { code: 'rate_limited', message: 'Too many attempts; wait a few minutes and try again' } });
}

/**
 * Limits attempts per network address and e-mail, so guessing a password is slow. The key is the
 * address as accounts are looked up by it, so padding, case or compatibility forms make no new key.
 */
function attemptLimiter(limit: number) {
  return rateLimit({
    windowMs: 10 * 60 * 1000,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    keyGenerator: (req) => `${ipKeyGenerator(req.ip ?? '')}|${bodyEmail(req)}`,
    handler: refuse,
  });
}

/**
 * Limits attempts per account whatever network address they come from (the key is the looked-up
 * address alone), counting only the refused ones when `failuresOnly`; an unknown address counts the
 * same way, so the limit does not tell which addresses have accounts.
 */
function accountLimiter(limit: number, windowMs: number, failuresOnly: boolean) {
  return rateLimit({
    windowMs,
    limit,
    standardHeaders: 'draft-8',
    legacyHeaders: false,
    skipSuccessfulRequests: failuresOnly,
    keyGenerator: (req) => `account|${bodyEmail(req)}`,
    handler: refuse,
  });
}

/**
 * Sign-in, sign-up, refresh, sign-out, password change and reset; `signupOpen` says whether sign-up
 * is open now (the server-wide settings), so this feature does not import the accounts feature.
 */
export function authRoutes(routes: ApiRoutes, app: AppContext, auth: AuthService, signupOpen: () => Promise<boolean>): void {
  const tag = 'auth';
  const limit = app.config.signInAttempts;
  // Many addresses together may guess one account's password a few times more than one address may
  // (OWASP Authentication Cheat Sheet: limit per account as well as per address, common practice).
  const accountFailures = accountLimiter(limit * 3, 10 * 60 * 1000, true);
  // Every reset request may send a mail: a few an hour to one mailbox, whoever asks.
  const resetMails = accountLimiter(RESET_MAILS_PER_HOUR, 60 * 60 * 1000, false);

  routes.add({
    method: 'get',
    path: '/auth/options',
    summary: 'What the sign-in page may offer (is sign-up open?)',
    tag,
    access: access.public,
    response: z.object({ signupOpen: z.boolean() }),
    handler: async () => ({ signupOpen: await signupOpen() }),
  });

  routes.add({
    method: 'post',
    path: '/auth/sign-in',
    summary: 'Sign in with e-mail and password',
    tag,
    access: access.public,
    before: [attemptLimiter(limit), accountFailures],
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
      if (!await signupOpen()) {
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
      clearSession(res);
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
    before: [attemptLimiter(limit), resetMails],
    body: ResetRequestBody,
    status: 202,
    response: z.object({ sent: z.literal(true) }),
    handler: ({ body }) => {
      // Answered before the account is even looked up, so the answer takes as long for an unknown
      // address as for a known one; the link is made and mailed afterwards.
      setImmediate(() => {
        sendResetLink(app, auth, body.email).catch((err: unknown) => app.logger.error({ err }, 'could not send a password-reset mail'));
      });
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

/** How many reset mails one address gets in an hour at most, however many times it is asked for. */
export const RESET_MAILS_PER_HOUR = 5;

/** Makes a reset link for the account with this address, if there is one, and mails it. */
async function sendResetLink(app: AppContext, auth: AuthService, email: string): Promise<void> {
  const started = await auth.startReset(email);
  if (!started) return;
  // The address rides along so the page can say which account it resets (it goes only to that mailbox).
  const link = `${mailLinkBase(app.config)}/reset-password?token=${encodeURIComponent(started.token)}&account=${encodeURIComponent(started.user.email)}`;
  await app.mail.send({
    to: started.user.email,
    subject: 'Reset your Cairn password',
    text:
      `Hello ${started.user.name},\n\nSomeone asked to reset the password of your Cairn account. ` +
      `If it was you, open this link within an hour:\n\n${link}\n\nIf it was not you, ignore this message; your password stays as it is.\n`,
  });
}
