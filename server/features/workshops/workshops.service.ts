import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import { Op, type Transaction } from 'sequelize';
import type { Database } from '../../db';
import type { AgendaItemRow, UserRow, WorkshopRow } from '../../db/models';
import { because, errors } from '../../common/errors';
import type { WorkshopAccessRole } from '../../common/access';
import { instantiateTemplate, templateFill } from '../../../shared/templates';
import { newAgendaItem, copyTitle } from '../../../shared/activities';
import { RuleSettings } from '../../../shared/schemas/day-window';
import {
  DEFAULT_CONSENT_TEXT,
  type CreateWorkshopBody,
  type UpdateWorkshopBody,
  type Workshop,
  type WorkshopSummary,
} from '../../../shared/schemas/workshop';
import { AgendaItem, type ActivityType, type AgendaItemInput } from '../../../shared/schemas/agenda-item';

/** The default window of a workshop that starts from a blank page (common practice: 09:00–17:00, run 10:00–16:00). */
const DEFAULT_WINDOW = { doorsOpen: '09:00', doorsClose: '17:00', start: '10:00', end: '16:00' };

/** The columns of an agenda item row that the shared schema describes. */
export type AgendaItemFields = Pick<AgendaItemRow, 'id' | 'type' | 'phase' | 'title' | 'timeboxMin' | 'minTimeboxMin' | 'prompt' | 'settings'> & {
  pinnedAt?: string | null;
};

/** An agenda item row as the shared schema describes it. */
export function toAgendaItem(row: AgendaItemFields): AgendaItem {
  return AgendaItem.parse({
    id: row.id,
    type: row.type,
    phase: row.phase,
    title: row.title,
    timeboxMin: row.timeboxMin,
    minTimeboxMin: row.minTimeboxMin,
    prompt: row.prompt,
    settings: row.settings ?? {},
    ...(row.pinnedAt ? { pinnedAt: row.pinnedAt } : {}),
  });
}

/** The role that the workshop's owner, the account's membership and the account's own role give it. */
function decideRole(userId: string, accountRole: string, ownerId: string, memberRole: WorkshopAccessRole | null): WorkshopAccessRole | null {
  if (ownerId === userId) return 'owner';
  if (memberRole) return memberRole;
  return accountRole === 'admin' ? 'admin' : null;
}

/** Workshops and their agendas: the planning rules of Cairn's server live here. */
export class WorkshopsService {
  constructor(
    private db: Database,
    /** Deletes the photo rows of these live sessions in the transaction; returns the files to remove after the commit. */
    private erasePhotos: (sessionIds: string[], transaction: Transaction) => Promise<string[]> = async () => [],
  ) {}

  /** The account's role on a workshop, `null` for none, `'missing'` for no such workshop. */
  async roleOf(user: UserRow, workshopId: string): Promise<WorkshopAccessRole | null | 'missing'> {
    const w = await this.db.models.Workshop.findByPk(workshopId, { attributes: ['id', 'ownerId'] });
    if (!w) return 'missing';
    const m = w.ownerId === user.id ? null : await this.db.models.Membership.findOne({ where: { workshopId, userId: user.id } });
    return decideRole(user.id, user.role, w.ownerId, m?.role ?? null);
  }

  /**
   * The role of an enabled account, by id, on a workshop; `null` for none, a disabled or unknown account,
   * no such workshop, or a token version (when given) that is no longer the account's. One query: live
   * commands check it afresh on every command.
   */
  async roleOfAccount(userId: string, workshopId: string, tokenVersion?: number): Promise<WorkshopAccessRole | null> {
    // A prepared statement on the reading connection: every facilitator command runs this check before the room hears of it.
    const [row] = await this.db.read<{ role: string; disabled: number; tokenVersion: number; ownerId: string | null; memberRole: WorkshopAccessRole | null }>(
      `SELECT u.role AS role, u.disabled AS disabled, u.tokenVersion AS tokenVersion, w.ownerId AS ownerId, m.role AS memberRole
       FROM users u LEFT JOIN workshops w ON w.id = ? LEFT JOIN memberships m ON m.workshopId = w.id AND m.userId = u.id
       WHERE u.id = ?`,
      [workshopId, userId],
    );
    if (!row || Boolean(row.disabled) || row.ownerId === null) return null;
    if (tokenVersion !== undefined && Number(row.tokenVersion) !== tokenVersion) return null;
    return decideRole(userId, row.role, row.ownerId, row.memberRole);
  }

  /** The workshops an account may see: its own, those it was invited to, and every one for an admin. */
  async list(user: UserRow): Promise<WorkshopSummary[]> {
    const { Workshop, Membership, User, AgendaItem: Item } = this.db.models;
    const memberships = await Membership.findAll({ where: { userId: user.id } });
    const roleById = new Map<string, WorkshopAccessRole>(memberships.map((m) => [m.workshopId, m.role]));
    const where =
      user.role === 'admin' ? {} : { [Op.or]: [{ ownerId: user.id }, { id: { [Op.in]: [...roleById.keys()] } }] };
    const rows = await Workshop.findAll({ where, order: [['date', 'DESC'], ['createdAt', 'DESC']] });
    const owners = await User.findAll({ where: { id: { [Op.in]: [...new Set(rows.map((r) => r.ownerId))] } } });
    const ownerName = new Map(owners.map((o) => [o.id, o.name]));
    const counts = (await Item.count({ where: { workshopId: { [Op.in]: rows.map((r) => r.id) } }, group: ['workshopId'] })) as unknown as {
      workshopId: string;
      count: number;
    }[];
    const countById = new Map(counts.map((c) => [c.workshopId, Number(c.count)]));
    return rows.map((r) => ({
      id: r.id,
      title: r.title,
      date: r.date,
      headcount: r.headcount,
      ownerName: ownerName.get(r.ownerId) ?? '',
      myRole: r.ownerId === user.id ? 'owner' : (roleById.get(r.id) ?? 'admin'),
      itemCount: countById.get(r.id) ?? 0,
      updatedAt: r.updatedAt.toISOString(),
    }));
  }

  /** One workshop with its agenda, as the caller sees it. */
  async get(workshopId: string, myRole: WorkshopAccessRole): Promise<Workshop> {
    const w = await this.row(workshopId);
    const owner = await this.db.models.User.findByPk(w.ownerId);
    return this.toWorkshop(w, owner?.name ?? '', myRole, await this.agenda(workshopId));
  }

  /** The agenda of a workshop, in order. */
  async agenda(workshopId: string): Promise<AgendaItem[]> {
    const rows = await this.db.models.AgendaItem.findAll({ where: { workshopId }, order: [['position', 'ASC']] });
    return rows.map(toAgendaItem);
  }

  /** Creates a workshop for its owner, from a template or with an empty agenda. */
  async create(owner: UserRow, body: CreateWorkshopBody): Promise<string> {
    const id = crypto.randomUUID();
    const fromTemplate = body.templateId ? instantiateTemplate(body.templateId, () => crypto.randomUUID(), templateFill(body)) : null;
    await this.db.writeTx(async (transaction) => {
      await this.db.models.Workshop.create(
        {
          id,
          ownerId: owner.id,
          title: body.title,
          objective: body.objective,
          persona: body.persona ?? '',
          date: body.date,
          window: body.window ?? fromTemplate?.window ?? DEFAULT_WINDOW,
          venueNotes: body.venueNotes ?? '',
          headcount: body.headcount,
          teamCount: body.teamCount ?? 3,
          roomCapacity: body.roomCapacity ?? null,
          consentText: body.consentText ?? DEFAULT_CONSENT_TEXT,
          rules: body.rules ?? RuleSettings.parse({}),
          packed: [],
        },
        { transaction },
      );
      const items = fromTemplate?.items ?? [];
      await this.db.models.AgendaItem.bulkCreate(
        items.map((item, position) => ({ ...item, workshopId: id, position })),
        { transaction },
      );
    });
    return id;
  }

  /** Changes any part of the brief. */
  async update(workshopId: string, body: UpdateWorkshopBody): Promise<void> {
    const w = await this.row(workshopId);
    w.set(body);
    await w.save();
  }

  /** Deletes a workshop and everything in it. */
  async remove(workshopId: string): Promise<void> {
    const w = await this.row(workshopId);
    const files = await this.db.writeTx(async (transaction) => {
      const sessions = await this.db.models.LiveSession.findAll({ where: { workshopId }, attributes: ['id'], transaction });
      const photoFiles = await this.erasePhotos(sessions.map((x) => x.id), transaction);
      await this.db.models.AgendaItem.destroy({ where: { workshopId }, transaction });
      await this.db.models.Membership.destroy({ where: { workshopId }, transaction });
      await this.db.models.Invitation.destroy({ where: { workshopId }, transaction });
      await w.destroy({ transaction });
      return photoFiles;
    });
    // After the commit, so no row ever points at a missing file.
    await Promise.all(files.map((f) => fs.rm(f, { force: true }).catch(() => undefined)));
  }

  /** Adds an item, from the library's defaults for its type or as typed, at a position (default: the end). */
  async addItem(
    workshopId: string,
    input: { type: ActivityType; position?: number; item?: AgendaItemInput },
  ): Promise<AgendaItem> {
    await this.row(workshopId);
    const id = crypto.randomUUID();
    const item: AgendaItem = input.item ? { ...input.item, id } : newAgendaItem(input.type, id);
    await this.db.writeTx(async (transaction) => {
      const items = await this.db.models.AgendaItem.findAll({ where: { workshopId }, order: [['position', 'ASC']], transaction });
      const at = Math.min(input.position ?? items.length, items.length);
      for (const row of items.slice(at)) await row.update({ position: row.position + 1 }, { transaction });
      await this.db.models.AgendaItem.create({ ...item, workshopId, position: at }, { transaction });
    });
    return item;
  }

  /** Replaces an item's fields. */
  async updateItem(workshopId: string, itemId: string, input: AgendaItemInput): Promise<AgendaItem> {
    const row = await this.itemRow(workshopId, itemId);
    // An input without a pinned time unpins the item: the dialog sends the whole item.
    await row.update({ ...input, pinnedAt: input.pinnedAt ?? null });
    return toAgendaItem(row);
  }

  /** Copies an item right after itself. */
  async duplicateItem(workshopId: string, itemId: string): Promise<AgendaItem> {
    const row = await this.itemRow(workshopId, itemId);
    const { id: _id, ...copy } = toAgendaItem(row);
    const titles = (await this.agenda(workshopId)).map((i) => i.title);
    return this.addItem(workshopId, { type: copy.type, position: row.position + 1, item: { ...copy, title: copyTitle(copy.title, titles) } });
  }

  /** Removes an item and closes the gap. */
  async removeItem(workshopId: string, itemId: string): Promise<void> {
    const row = await this.itemRow(workshopId, itemId);
    await this.db.writeTx(async (transaction) => {
      await row.destroy({ transaction });
      const later = await this.db.models.AgendaItem.findAll({
        where: { workshopId, position: { [Op.gt]: row.position } },
        transaction,
      });
      for (const r of later) await r.update({ position: r.position - 1 }, { transaction });
    });
  }

  /** Puts the agenda in a new order; the ids must be exactly the agenda's items. */
  async reorder(workshopId: string, ids: string[]): Promise<AgendaItem[]> {
    await this.db.writeTx(async (transaction) => {
      const rows = await this.db.models.AgendaItem.findAll({ where: { workshopId }, transaction });
      const known = new Set(rows.map((r) => r.id));
      if (ids.length !== rows.length || new Set(ids).size !== ids.length || !ids.every((id) => known.has(id))) {
        throw errors.badRequest('The new order must list every item of the agenda exactly once', because('reorder_incomplete'));
      }
      const pos = new Map(ids.map((id, i) => [id, i]));
      for (const r of rows) {
        const p = pos.get(r.id)!;
        if (r.position !== p) await r.update({ position: p }, { transaction });
      }
    });
    return this.agenda(workshopId);
  }

  /** Stores which packing-list lines are ticked off. */
  async setPacked(workshopId: string, keys: string[]): Promise<string[]> {
    const w = await this.row(workshopId);
    w.packed = [...new Set(keys)];
    await w.save();
    return w.packed;
  }

  /** The workshop row, or a not-found error. */
  async row(workshopId: string): Promise<WorkshopRow> {
    const w = await this.db.models.Workshop.findByPk(workshopId);
    if (!w) throw errors.notFound('workshop');
    return w;
  }

  private async itemRow(workshopId: string, itemId: string): Promise<AgendaItemRow> {
    const row = await this.db.models.AgendaItem.findOne({ where: { id: itemId, workshopId } });
    if (!row) throw errors.notFound('item');
    return row;
  }

  private toWorkshop(w: WorkshopRow, ownerName: string, myRole: WorkshopAccessRole, agenda: AgendaItem[]): Workshop {
    return {
      id: w.id,
      ownerId: w.ownerId,
      ownerName,
      myRole,
      title: w.title,
      objective: w.objective,
      persona: w.persona,
      date: w.date,
      window: w.window,
      venueNotes: w.venueNotes,
      headcount: w.headcount,
      teamCount: w.teamCount,
      roomCapacity: w.roomCapacity,
      consentText: w.consentText,
      rules: RuleSettings.parse(w.rules ?? {}),
      agenda,
      packed: w.packed ?? [],
      createdAt: w.createdAt.toISOString(),
      updatedAt: w.updatedAt.toISOString(),
    };
  }
}
