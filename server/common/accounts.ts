import crypto from 'node:crypto';
import type { Database } from '../db';
import type { UserRow } from '../db/models';
import { because, errors } from './errors';
import { hashPassword } from './passwords';
import { normaliseEmail, type GlobalRole, type User } from '../../shared/schemas/user';

/** An account row as the API shows it. */
export function toUser(row: UserRow): User {
  return {
    id: row.id,
    email: row.email,
    name: row.name,
    role: row.role,
    disabled: row.disabled,
    createdAt: row.createdAt.toISOString(),
  };
}

/** The account with this e-mail address, in whatever spelling ({@link normaliseEmail}), or null. */
export function findAccountByEmail(db: Database, email: string): Promise<UserRow | null> {
  return db.models.User.findOne({ where: { email: normaliseEmail(email) } });
}

/** Creates an account (sign-up, the admin, an accepted invitation); fails with a conflict if the e-mail is taken. */
export async function createAccount(
  db: Database,
  input: { email: string; name: string; password: string; role: GlobalRole },
): Promise<UserRow> {
  const existing = await findAccountByEmail(db, input.email);
  if (existing) throw errors.conflict('An account with that e-mail already exists', because('account_exists'));
  return db.models.User.create({
    id: crypto.randomUUID(),
    email: normaliseEmail(input.email),
    name: input.name,
    role: input.role,
    passwordHash: await hashPassword(input.password),
  });
}
