import { dayText } from '../../../shared/words';
import crypto from 'node:crypto';
import { Op } from 'sequelize';
import type { Database } from '../../db';
import type { InvitationRow, UserRow } from '../../db/models';
import { AppError, because, errors } from '../../common/errors';
import { hashToken, newToken } from '../../common/passwords';
import { normaliseEmail } from '../../../shared/schemas/user';
import type { Mailer } from '../mail/mail.service';
import type { Invitation, InvitationInfo, InviteBody, Member, People } from '../../../shared/schemas/member';

/** How long an invitation link works. */
const INVITATION_DAYS = 14;

const ROLE_WORDS = { cofacilitator: 'co-facilitator', observer: 'observer' } as const;

function toInvitation(r: InvitationRow): Invitation {
  return {
    id: r.id,
    email: r.email,
    role: r.role,
    createdAt: r.createdAt.toISOString(),
    expiresAt: r.expiresAt.toISOString(),
    acceptedAt: r.acceptedAt ? r.acceptedAt.toISOString() : null,
  };
}

/** Co-facilitators and observers of a workshop, and the invitations that make them. */
export class MembersService {
  constructor(
    private db: Database,
    private mail: Mailer,
  ) {}

  /** The owner, the members and the open invitations of a workshop. */
  async people(workshopId: string): Promise<People> {
    const { Workshop, Membership, User, Invitation } = this.db.models;
    const w = await Workshop.findByPk(workshopId);
    if (!w) throw errors.notFound('workshop');
    const memberships = await Membership.findAll({ where: { workshopId }, order: [['createdAt', 'ASC']] });
    const users = await User.findAll({ where: { id: { [Op.in]: [w.ownerId, ...memberships.map((m) => m.userId)] } } });
    const byId = new Map(users.map((u) => [u.id, u]));
    const owner = byId.get(w.ownerId);
    const members: Member[] = [
      ...(owner ? [{ membershipId: null, userId: owner.id, name: owner.name, email: owner.email, role: 'owner' as const }] : []),
      ...memberships.flatMap((m) => {
        const u = byId.get(m.userId);
        return u ? [{ membershipId: m.id, userId: u.id, name: u.name, email: u.email, role: m.role }] : [];
      }),
    ];
    const invitations = await Invitation.findAll({ where: { workshopId, acceptedAt: null }, order: [['createdAt', 'ASC']] });
    return { members, invitations: invitations.map(toInvitation) };
  }

  /** Invites someone by e-mail and sends the link; a repeated invitation replaces the open one. */
  async invite(workshopId: string, inviter: UserRow, body: InviteBody, baseUrl: string): Promise<Invitation> {
    const { Workshop, Invitation, Membership, User } = this.db.models;
    const w = await Workshop.findByPk(workshopId);
    if (!w) throw errors.notFound('workshop');
    const existing = await User.findOne({ where: { email: body.email } });
    if (existing && (existing.id === w.ownerId || (await Membership.findOne({ where: { workshopId, userId: existing.id } })))) {
      throw errors.conflict('That person already has a role on this workshop', because('already_member'));
    }
    const token = newToken();
    const row = await this.db.writeTx(async (transaction) => {
      await Invitation.destroy({ where: { workshopId, email: body.email, acceptedAt: null }, transaction });
      return Invitation.create(
        {
          id: crypto.randomUUID(),
          workshopId,
          email: body.email,
          role: body.role,
          tokenHash: hashToken(token),
          invitedById: inviter.id,
          acceptedAt: null,
          expiresAt: new Date(Date.now() + INVITATION_DAYS * 86400_000),
        },
        { transaction },
      );
    });
    const link = `${baseUrl}/invitations/accept?token=${encodeURIComponent(token)}`;
    await this.mail.send({
      to: body.email,
      subject: `${inviter.name} invites you to the Cairn workshop “${w.title}”`,
      text:
        `Hello,\n\n${inviter.name} invites you to the workshop “${w.title}” (${dayText(w.date, 'en-GB')}) as ${ROLE_WORDS[body.role]}.\n\n` +
        (body.role === 'observer'
          ? 'As an observer you can read the plan, the results and the report.\n\n'
          : 'As a co-facilitator you can plan the agenda, run the live console and moderate.\n\n') +
        `Accept the invitation within ${INVITATION_DAYS} days:\n\n${link}\n\nIf you did not expect this, ignore this message.\n`,
    });
    return toInvitation(row);
  }

  /** Withdraws an open invitation. */
  async revoke(workshopId: string, invitationId: string): Promise<void> {
    const n = await this.db.models.Invitation.destroy({ where: { id: invitationId, workshopId, acceptedAt: null } });
    if (n === 0) throw errors.notFound('invitation');
  }

  /** Takes a member's role away. */
  async removeMember(workshopId: string, membershipId: string): Promise<void> {
    const n = await this.db.models.Membership.destroy({ where: { id: membershipId, workshopId } });
    if (n === 0) throw errors.notFound('member');
  }

  /** What an invitation link is for, before accepting. */
  async info(token: string): Promise<InvitationInfo> {
    const inv = await this.open(token);
    const w = await this.db.models.Workshop.findByPk(inv.workshopId);
    const inviter = await this.db.models.User.findByPk(inv.invitedById);
    const account = await this.db.models.User.findOne({ where: { email: inv.email } });
    return {
      workshopTitle: w?.title ?? '',
      role: inv.role,
      email: inv.email,
      invitedBy: inviter?.name ?? '',
      accountExists: account !== null,
    };
  }

  /**
   * Accepts an invitation for the account it was sent to: the per-workshop role is created. Another
   * account is told whose invitation it is and refused, so no one takes a role (or changes their
   * own) through someone else's link.
   */
  async accept(token: string, user: UserRow): Promise<string> {
    const inv = await this.open(token);
    if (normaliseEmail(user.email) !== normaliseEmail(inv.email)) {
      throw errors.forbidden(`This invitation is for ${inv.email}; sign in as ${inv.email} to accept it`, because('invitation_other_account', { email: inv.email }));
    }
    const w = await this.db.models.Workshop.findByPk(inv.workshopId);
    if (!w) throw errors.notFound('workshop');
    if (w.ownerId === user.id) throw errors.conflict('You are this workshop’s lead facilitator already', because('already_lead'));
    await this.db.writeTx(async (transaction) => {
      const { Membership } = this.db.models;
      const m = await Membership.findOne({ where: { workshopId: inv.workshopId, userId: user.id }, transaction });
      if (m) await m.update({ role: inv.role }, { transaction });
      else await Membership.create({ id: crypto.randomUUID(), workshopId: inv.workshopId, userId: user.id, role: inv.role }, { transaction });
      await inv.update({ acceptedAt: new Date() }, { transaction });
    });
    return inv.workshopId;
  }

  /** The e-mail an invitation was sent to (for creating the account that accepts it). */
  async emailOf(token: string): Promise<string> {
    return (await this.open(token)).email;
  }

  private async open(token: string): Promise<InvitationRow> {
    const inv = await this.db.models.Invitation.findOne({ where: { tokenHash: hashToken(token) } });
    if (!inv || inv.acceptedAt || inv.expiresAt.getTime() < Date.now()) {
      throw new AppError(404, 'not_found', 'This invitation link is no longer valid; ask the facilitator for a new one', undefined, because('invitation_invalid'));
    }
    return inv;
  }
}
