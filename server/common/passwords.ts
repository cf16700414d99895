import bcrypt from 'bcryptjs';
import crypto from 'node:crypto';

/** bcrypt cost: about 100 ms a hash on a laptop, slow enough for guessing, quick enough for sign-in. */
const BCRYPT_COST = 10;
/** A hash to compare against when the e-mail is unknown, so timing does not reveal accounts. */
const DUMMY_HASH = bcrypt.hashSync('cairn-no-such-account', BCRYPT_COST);

/** Hashes a password with bcrypt (accounts, the demo seed). */
export function hashPassword(password: string): Promise<string> {
  return bcrypt.hash(password, BCRYPT_COST);
}

/** Checks a password against a stored hash; with no hash it still spends a comparison's time and answers false. */
export async function checkPassword(password: string, hash: string | null | undefined): Promise<boolean> {
  const ok = await bcrypt.compare(password, hash ?? DUMMY_HASH);
  return ok && hash != null;
}

/** Hashes a one-time token (invitation, password reset) for storage. */
export function hashToken(token: string): string {
  return crypto.createHash('sha256').update(token).digest('hex');
}

/** Makes a random one-time token for a link. */
export function newToken(): string {
  return crypto.randomBytes(32).toString('base64url');
}
