import { createSecretKey, type KeyObject } from 'node:crypto';
import jwt from 'jsonwebtoken';
import { z } from 'zod';

/** Claims of an account's access token. */
const UserClaims = z.object({ kind: z.literal('user'), sub: z.string(), tv: z.number() });
/** Claims of an account's refresh token (kept in an HttpOnly cookie). */
const RefreshClaims = z.object({ kind: z.literal('refresh'), sub: z.string(), tv: z.number() });
/** Claims of a participant's session-scoped token. */
const ParticipantClaims = z.object({ kind: z.literal('participant'), sub: z.string(), sid: z.string() });
/** Claims of a projector's read-only token for one live session. */
const DisplayClaims = z.object({ kind: z.literal('display'), sid: z.string() });

/** The kinds of token Cairn signs, with their claims. */
export type TokenClaims =
  | z.infer<typeof UserClaims>
  | z.infer<typeof RefreshClaims>
  | z.infer<typeof ParticipantClaims>
  | z.infer<typeof DisplayClaims>;

const Claims = z.discriminatedUnion('kind', [UserClaims, RefreshClaims, ParticipantClaims, DisplayClaims]);

/** Why a token was refused. */
export type TokenProblem = 'expired' | 'invalid';

/** Signs and verifies Cairn's HS256 tokens; any other algorithm (including `none`) is refused. */
export class TokenService {
  /**
   * The secret as a key object, made once: given the string, jsonwebtoken makes a key object on every sign
   * and verify, which cost about 3 ms each on the 2-core development machine against 0.03–0.1 ms with it
   * (measured 2026-12-02 under load; a phone's join signs one token and its socket verifies it).
   */
  private secret: KeyObject;

  constructor(
    secret: string,
    private accessTtlSec: number,
  ) {
    this.secret = createSecretKey(Buffer.from(secret, 'utf8'));
  }

  /** Seconds an access token lives. */
  get accessTtl(): number {
    return this.accessTtlSec;
  }

  /** Signs a short-lived access token for an account. */
  signAccess(userId: string, tokenVersion: number): string {
    return jwt.sign({ kind: 'user', tv: tokenVersion }, this.secret, {
      algorithm: 'HS256',
      subject: userId,
      expiresIn: this.accessTtlSec,
    });
  }

  /** Signs a 30-day refresh token for an account. */
  signRefresh(userId: string, tokenVersion: number): string {
    return jwt.sign({ kind: 'refresh', tv: tokenVersion }, this.secret, {
      algorithm: 'HS256',
      subject: userId,
      expiresIn: '30d',
    });
  }

  /** Signs a participant token scoped to one live session. */
  signParticipant(participantId: string, sessionId: string): string {
    return jwt.sign({ kind: 'participant', sid: sessionId }, this.secret, {
      algorithm: 'HS256',
      subject: participantId,
      expiresIn: '2d',
    });
  }

  /** Signs a long-lived, read-only token that opens one live session's projector screen without signing in. */
  signDisplay(sessionId: string): string {
    // A projector link is printed or bookmarked before the day, and a workshop may pause for days.
    return jwt.sign({ kind: 'display', sid: sessionId }, this.secret, { algorithm: 'HS256', expiresIn: '30d' });
  }

  /** Verifies a token's signature, algorithm and expiry, and returns its claims or the problem. */
  verify(token: string): { ok: true; claims: TokenClaims } | { ok: false; problem: TokenProblem } {
    try {
      const raw = jwt.verify(token, this.secret, { algorithms: ['HS256'] });
      const parsed = Claims.safeParse(raw);
      return parsed.success ? { ok: true, claims: parsed.data } : { ok: false, problem: 'invalid' };
    } catch (err) {
      return { ok: false, problem: err instanceof jwt.TokenExpiredError ? 'expired' : 'invalid' };
    }
  }
}
