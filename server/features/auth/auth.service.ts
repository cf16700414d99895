import crypto from 'node:crypto';
import type { Request } from 'express';
import type { Transaction } from 'sequelize';
import type { Database } from '../../db';
import type { UserRow } from '../../db/models';
import type { TokenService } from '../../common/tokens';
import type { Caller } from '../../context';
import { AppError, because, errors } from '../../common/errors';
import { checkPassword, hashPassword, hashToken, newToken } from '../../common/passwords';
import { createAccount, findAccountByEmail } from '../../common/accounts';
import type { GlobalRole } from '../../../shared/schemas/user';

/** Accounts, passwords and tokens: the rules of signing in live here. */
export class AuthService {
  constructor(
    private db: Database,
    private tokens: TokenService,
  ) {}

  /** Works out who sent a request from its bearer token. */
  callerOf(req: Request): Promise<Caller> {
    const header = req.headers.authorization;
    const token = header?.startsWith('Bearer ') ? header.slice(7).trim() : undefined;
    return this.callerOfToken(token);
  }

  /** Works out who holds a token (access token of an account, a participant token, or a projector's display token). */
  async callerOfToken(token: string | undefined): Promise<Caller> {
    if (!token) return { kind: 'anonymous' };
    const v = this.tokens.verify(token);
    if (!v.ok) return { kind: 'problem', problem: v.problem };
    const c = v.claims;
    if (c.kind === 'participant') return { kind: 'participant', participantId: c.sub, sessionId: c.sid };
    if (c.kind === 'display') return { kind: 'display', sessionId: c.sid };
    if (c.kind !== 'user') return { kind: 'problem', problem: 'invalid' };
    const user = await this.db.models.User.findByPk(c.sub);
    if (!user || user.disabled || user.tokenVersion !== c.tv) return { kind: 'problem', problem: 'invalid' };
    return { kind: 'user', user };
  }

  /** Checks an e-mail and password; the same message for an unknown e-mail and a wrong password. */
  async signIn(email: string, password: string): Promise<UserRow> {
    const user = await this.findByEmail(email);
    const ok = await checkPassword(password, user?.passwordHash);
    if (!user || !ok) throw new AppError(401, 'wrong_credentials', 'That e-mail and password do not match an account', undefined, because('sign_in_failed'));
    if (user.disabled) throw new AppError(403, 'forbidden', 'This account is disabled; ask your Cairn admin', undefined, because('account_disabled'));
    return user;
  }

  /** Creates an account; fails with a conflict if the e-mail is taken. */
  createUser(input: { email: string; name: string; password: string; role: GlobalRole }): Promise<UserRow> {
    return createAccount(this.db, input);
  }

  /** The account with this e-mail address, in whatever spelling, or null. */
  findByEmail(email: string): Promise<UserRow | null> {
    return findAccountByEmail(this.db, email);
  }

  /** Issues the access and refresh tokens of a session. */
  issue(user: UserRow): { access: string; refresh: string; expiresInSec: number } {
    return {
      access: this.tokens.signAccess(user.id, user.tokenVersion),
      refresh: this.tokens.signRefresh(user.id, user.tokenVersion),
      expiresInSec: this.tokens.accessTtl,
    };
  }

  /** Exchanges a refresh token for the account it belongs to, if still valid. */
  async fromRefresh(token: string | undefined): Promise<UserRow> {
    if (!token) throw errors.unauthenticated('Not signed in');
    const v = this.tokens.verify(token);
    if (!v.ok || v.claims.kind !== 'refresh') throw errors.unauthenticated('Not signed in');
    const user = await this.db.models.User.findByPk(v.claims.sub);
    if (!user || user.disabled || user.tokenVersion !== v.claims.tv) throw errors.unauthenticated('Not signed in');
    return user;
  }

  /** Ends every session of the account (all its tokens stop working). */
  async signOutEverywhere(user: UserRow): Promise<void> {
    // Saved through the instance (not `increment`), so the model's update hooks tell open screens at once.
    user.tokenVersion += 1;
    await user.save();
  }

  /** Changes a password after checking the current one; other sessions are signed out. */
  async changePassword(user: UserRow, current: string, next: string): Promise<UserRow> {
    if (!(await checkPassword(current, user.passwordHash))) {
      throw new AppError(400, 'wrong_credentials', 'Your current password is not right', { currentPassword: 'Not right' }, { ...because('current_password_wrong'), fieldIssues: { currentPassword: { code: 'current_password_wrong' } } });
    }
    const hash = await hashPassword(next);
    await this.db.writeTx(async (transaction) => {
      user.passwordHash = hash;
      user.tokenVersion += 1;
      await user.save({ transaction });
      await this.voidResetLinks(user.id, transaction);
    });
    return user;
  }

  /** Starts a password reset: returns the one-time token, or null when the e-mail has no account. The account's older links stop working. */
  async startReset(email: string): Promise<{ user: UserRow; token: string } | null> {
    const user = await this.findByEmail(email);
    if (!user || user.disabled) return null;
    const token = newToken();
    await this.db.writeTx(async (transaction) => {
      await this.voidResetLinks(user.id, transaction);
      await this.db.models.PasswordReset.create(
        {
          id: crypto.randomUUID(),
          userId: user.id,
          tokenHash: hashToken(token),
          usedAt: null,
          expiresAt: new Date(Date.now() + 60 * 60 * 1000),
        },
        { transaction },
      );
    });
    return { user, token };
  }

  /**
   * Completes a password reset with a one-time token. The token is spent by one conditional update
   * inside the writer queue, so of several requests sent at once only one sets a password; the
   * account's other links and sessions end with it.
   */
  async confirmReset(token: string, newPassword: string): Promise<void> {
    const invalid = () => new AppError(400, 'bad_request', 'This reset link is no longer valid; ask for a new one', undefined, because('reset_link_invalid'));
    const hash = await hashPassword(newPassword);
    await this.db.writeTx(async (transaction) => {
      const { PasswordReset, User } = this.db.models;
      const row = await PasswordReset.findOne({ where: { tokenHash: hashToken(token) }, transaction });
      if (!row || row.usedAt || row.expiresAt.getTime() < Date.now()) throw invalid();
      const [spent] = await PasswordReset.update({ usedAt: new Date() }, { where: { id: row.id, usedAt: null }, transaction });
      if (spent !== 1) throw invalid();
      const user = await User.findByPk(row.userId, { transaction });
      if (!user || user.disabled) throw invalid();
      user.passwordHash = hash;
      user.tokenVersion += 1;
      await user.save({ transaction });
      await this.voidResetLinks(user.id, transaction);
    });
  }

  /** Ends every reset link of an account that is still open. */
  private async voidResetLinks(userId: string, transaction: Transaction): Promise<void> {
    await this.db.models.PasswordReset.update({ usedAt: new Date() }, { where: { userId, usedAt: null }, transaction });
  }
}
