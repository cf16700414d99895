import { z } from 'zod';
import { Email, NewPassword } from './user';

/** Roles an invitation can give on one workshop. */
export const InviteRole = z.enum(['cofacilitator', 'observer']);
/** A role an invitation can give. */
export type InviteRole = z.infer<typeof InviteRole>;

/** Body of inviting someone to a workshop by e-mail. */
export const InviteBody = z.object({ email: Email, role: InviteRole });
/** Body of inviting someone to a workshop. */
export type InviteBody = z.infer<typeof InviteBody>;

/** A person with a role on a workshop. */
export const Member = z.object({
  membershipId: z.string().nullable(),
  userId: z.string(),
  name: z.string(),
  email: z.string(),
  role: z.enum(['owner', 'cofacilitator', 'observer']),
});
/** A person with a role on a workshop. */
export type Member = z.infer<typeof Member>;

/** An invitation as the workshop's people list shows it. */
export const Invitation = z.object({
  id: z.string(),
  email: z.string(),
  role: InviteRole,
  createdAt: z.string(),
  expiresAt: z.string(),
  acceptedAt: z.string().nullable(),
});
/** An invitation. */
export type Invitation = z.infer<typeof Invitation>;

/** The people of a workshop: members and open invitations. */
export const People = z.object({ members: z.array(Member), invitations: z.array(Invitation) });
/** The people of a workshop. */
export type People = z.infer<typeof People>;

/** What the invitation link shows before accepting. */
export const InvitationInfo = z.object({
  workshopTitle: z.string(),
  role: InviteRole,
  email: z.string(),
  invitedBy: z.string(),
  accountExists: z.boolean(),
});
/** What the invitation link shows before accepting. */
export type InvitationInfo = z.infer<typeof InvitationInfo>;

/** Body of accepting an invitation while signed in. */
export const AcceptBody = z.object({ token: z.string().min(10).max(200) });
/** Body of accepting an invitation with a new account. */
export const AcceptNewBody = AcceptBody.extend({
  name: z.string().trim().min(1, 'Enter your name').max(80),
  password: NewPassword,
});
