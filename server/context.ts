import type { Request } from 'express';
import type { Logger } from 'pino';
import type { Config } from './config/env';
import type { Database } from './db';
import type { UserRow } from './db/models';
import type { TokenService, TokenProblem } from './common/tokens';
import type { WorkshopAccessRole } from './common/access';
import type { Mailer } from './features/mail/mail.service';
import type { Announcer } from './common/announcer';

/** Who is calling: nobody, an account, a participant, a projector screen, or someone whose token was refused. */
export type Caller =
  | { kind: 'anonymous' }
  | { kind: 'problem'; problem: TokenProblem }
  | { kind: 'user'; user: UserRow }
  | { kind: 'participant'; participantId: string; sessionId: string }
  | { kind: 'display'; sessionId: string };

/** The services every router and socket handler reaches through one object. */
export interface AppContext {
  config: Config;
  db: Database;
  tokens: TokenService;
  mail: Mailer;
  logger: Logger;
  /** The one way to tell screens what changed (server/common/announcer.ts), attached to socket.io once it exists. */
  announcer: Announcer;
  auth: { callerOf(req: Request): Promise<Caller>; callerOfToken(token: string | undefined): Promise<Caller> };
  /** The account's role on a workshop, `null` for none, `'missing'` when there is no such workshop. */
  workshopRoleOf(user: UserRow, workshopId: string): Promise<WorkshopAccessRole | null | 'missing'>;
  /**
   * An enabled account's role on a workshop by the account's id, in one query; `null` for none, a
   * disabled account, no workshop, or (when given) a token version that is no longer the account's.
   */
  accountRoleOf(userId: string, workshopId: string, tokenVersion?: number): Promise<WorkshopAccessRole | null>;
}
