import type { Database } from '../../db';
import { because, errors } from '../../common/errors';
import { createAccount } from '../../common/accounts';
import type { AppSettings, CreateUserBody, UpdateUserBody } from '../../../shared/schemas/user';
import type { UserRow } from '../../db/models';

/** Accounts and server-wide settings as the admin manages them. */
export class UsersService {
  constructor(
    private db: Database,
    private signupByConfig: boolean,
  ) {}

  /** Every account, oldest first. */
  list(): Promise<UserRow[]> {
    return this.db.models.User.findAll({ order: [['createdAt', 'ASC']] });
  }

  /** Creates an account as the admin asks; fails with a conflict if the e-mail is taken. */
  create(body: CreateUserBody): Promise<UserRow> {
    return createAccount(this.db, body);
  }

  /** Changes an account's name, role or disabled state; an admin cannot lock themselves out. */
  async update(actor: UserRow, id: string, body: UpdateUserBody): Promise<UserRow> {
    const user = await this.db.models.User.findByPk(id);
    if (!user) throw errors.notFound('account');
    if (user.id === actor.id && (body.disabled || (body.role && body.role !== 'admin'))) {
      throw errors.badRequest('You cannot disable your own account or take away your own admin role', because('own_account'));
    }
    if (body.name !== undefined) user.name = body.name;
    if (body.role !== undefined) user.role = body.role;
    if (body.disabled !== undefined) {
      user.disabled = body.disabled;
      if (body.disabled) user.tokenVersion += 1;
    }
    await user.save();
    return user;
  }

  /** The server-wide settings; sign-up is open when the config or an admin opened it. */
  async settings(): Promise<AppSettings & { signupByConfig: boolean }> {
    const row = await this.db.models.Setting.findByPk('signupOpen');
    const stored = row ? (JSON.parse(row.value) as boolean) : false;
    return { signupOpen: this.signupByConfig || stored, signupByConfig: this.signupByConfig };
  }

  /** Stores the server-wide settings. */
  async saveSettings(s: AppSettings): Promise<void> {
    await this.db.models.Setting.upsert({ key: 'signupOpen', value: JSON.stringify(s.signupOpen) });
  }
}
