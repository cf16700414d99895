import type { Request, Response } from 'express';
import type { UserRow } from '../db/models';
import { toUser } from './accounts';
import type { SessionAnswer } from '../../shared/schemas/user';

/** Name of the HttpOnly cookie that carries the refresh token. */
export const REFRESH_COOKIE = 'cairn_refresh';

/** What issues a session's tokens (the auth service). */
export interface SessionIssuer {
  /** The access and refresh tokens of a new session for the account. */
  issue(user: UserRow): { access: string; refresh: string; expiresInSec: number };
}

/**
 * Issues the tokens of a session: the refresh token as an HttpOnly cookie, the access token in the
 * answer. Sign-in, sign-up and an accepted invitation all start a session this one way.
 */
export function setSession(req: Request, res: Response, issuer: SessionIssuer, user: UserRow): SessionAnswer {
  const t = issuer.issue(user);
  res.cookie(REFRESH_COOKIE, t.refresh, {
    httpOnly: true,
    sameSite: 'strict',
    secure: req.secure,
    path: '/api/auth',
    maxAge: 30 * 24 * 3600 * 1000,
  });
  return { accessToken: t.access, expiresInSec: t.expiresInSec, user: toUser(user) };
}

/** Ends the session's cookie. */
export function clearSession(res: Response): void {
  res.clearCookie(REFRESH_COOKIE, { path: '/api/auth' });
}
