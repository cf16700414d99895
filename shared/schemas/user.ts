import { z } from 'zod';

/**
 * Global roles of an account; per-workshop roles live in memberships. A `member` has only the roles
 * invitations gave it on single workshops (an account made through an invitation starts so); an
 * admin may make it a facilitator.
 */
export const GlobalRole = z.enum(['admin', 'facilitator', 'member']);
/** A global role. */
export type GlobalRole = z.infer<typeof GlobalRole>;

/** The global roles that may create workshops. */
export const WORKSHOP_CREATOR_ROLES: GlobalRole[] = ['admin', 'facilitator'];

/** Roles a person can hold on one workshop. */
export const WorkshopRole = z.enum(['owner', 'cofacilitator', 'observer']);
/** A per-workshop role. */
export type WorkshopRole = z.infer<typeof WorkshopRole>;

/**
 * The one spelling of an e-mail address that Cairn stores, looks accounts up by and counts attempts
 * under: Unicode NFKC (so full-width and other compatibility forms become plain letters), spaces and
 * other white space around it trimmed, lower case.
 * @example normaliseEmail('\tＭＩＲＡ@harbourlane.example ') // 'mira@harbourlane.example'
 */
export function normaliseEmail(value: string): string {
  return value.normalize('NFKC').trim().toLowerCase();
}

/** An e-mail address in its one spelling ({@link normaliseEmail}). */
export const Email = z
  .string()
  .max(1000)
  .transform(normaliseEmail)
  .pipe(z.string().max(254).pipe(z.email('Enter a valid e-mail address')));

/** A new password: long enough to resist guessing, short enough for bcrypt (72 bytes). */
export const NewPassword = z
  .string()
  .min(10, 'Use at least 10 characters')
  .max(72, 'Use at most 72 characters');

/** An account as the API shows it (never the password hash). */
export const User = z.object({
  id: z.string(),
  email: z.string(),
  name: z.string(),
  role: GlobalRole,
  disabled: z.boolean(),
  createdAt: z.string(),
});
/** An account as the API shows it. */
export type User = z.infer<typeof User>;

/** Body of sign-in. */
export const SignInBody = z.object({
  email: Email,
  password: z.string().min(1, 'Enter your password').max(200),
});
/** Body of sign-in. */
export type SignInBody = z.infer<typeof SignInBody>;

/** Body of sign-up. */
export const SignUpBody = z.object({
  email: Email,
  name: z.string().trim().min(1, 'Enter your name').max(80),
  password: NewPassword,
});
/** Body of sign-up. */
export type SignUpBody = z.infer<typeof SignUpBody>;

/** Answer of sign-in, sign-up and refresh: a short-lived access token and who it is for. */
export const SessionAnswer = z.object({
  accessToken: z.string(),
  expiresInSec: z.number(),
  user: User,
});
/** Answer of sign-in, sign-up and refresh. */
export type SessionAnswer = z.infer<typeof SessionAnswer>;

/** Body of a password change. */
export const ChangePasswordBody = z.object({
  currentPassword: z.string().min(1, 'Enter your current password').max(200),
  newPassword: NewPassword,
});
/** Body of a password change. */
export type ChangePasswordBody = z.infer<typeof ChangePasswordBody>;

/** Body of an admin creating an account. */
export const CreateUserBody = z.object({
  email: Email,
  name: z.string().trim().min(1, 'Enter a name').max(80),
  role: GlobalRole,
  password: NewPassword,
});
/** Body of an admin creating an account. */
export type CreateUserBody = z.infer<typeof CreateUserBody>;

/** Body of an admin changing an account. */
export const UpdateUserBody = z
  .object({
    name: z.string().trim().min(1).max(80).optional(),
    role: GlobalRole.optional(),
    disabled: z.boolean().optional(),
  })
  .refine((b) => Object.keys(b).length > 0, 'Change at least one field');
/** Body of an admin changing an account. */
export type UpdateUserBody = z.infer<typeof UpdateUserBody>;

/** Server-wide settings an admin may change. */
export const AppSettings = z.object({
  signupOpen: z.boolean(),
});
/** Server-wide settings an admin may change. */
export type AppSettings = z.infer<typeof AppSettings>;

/** Body of a password-reset request. */
export const ResetRequestBody = z.object({ email: Email });
/** Body of a password-reset confirmation. */
export const ResetConfirmBody = z.object({
  token: z.string().min(10).max(200),
  newPassword: NewPassword,
});
