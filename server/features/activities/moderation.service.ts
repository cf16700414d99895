import crypto from 'node:crypto';
import type { Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { SubmissionRow } from '../../db/models';
import { because, errors } from '../../common/errors';
import { liveRooms } from '../live/live.service';
import { toPromoted, toTheme, type ActivitiesService } from './activities.service';
import type { NoteView, PromotedOption, ThemeView } from '../../../shared/schemas/activities';

/**
 * The facilitators' moderation of a live session's notes: hiding and showing them, merging duplicates,
 * affinity themes (made, applied from suggestions, renamed, removed, notes moved between them), and
 * promoting a note or a theme to an option of a later vote. Every change is written first; the boards
 * that show it are told after the commit (activities.service.ts).
 */
export class ModerationService {
  constructor(
    private ctx: AppContext,
    private activities: ActivitiesService,
  ) {}

  /** Hides notes from the room, or shows them again (the undo of a hide). */
  async hide(sessionId: string, noteIds: string[], hidden: boolean): Promise<NoteView[]> {
    const rows = await this.ctx.db.writeTx(async (transaction) => {
      const found = await this.notesOf(sessionId, noteIds, transaction);
      for (const r of found) {
        r.hidden = hidden;
        await r.save({ transaction });
      }
      return found;
    });
    // Phones too: a hidden note leaves teammates' boards and the sketch gallery.
    for (const itemId of new Set(rows.map((r) => r.itemId))) this.activities.changed(sessionId, itemId, this.activities.everyone(sessionId));
    return this.activities.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** Merges duplicates under the note to keep (a kept note that was itself merged hands over to the one it went under). */
  async merge(sessionId: string, keepId: string, duplicateIds: string[]): Promise<NoteView[]> {
    const { Submission } = this.ctx.db.models;
    const rows = await this.ctx.db.writeTx(async (transaction) => {
      let [keep] = await this.notesOf(sessionId, [keepId], transaction);
      if (keep!.mergedIntoId) [keep] = await this.notesOf(sessionId, [keep!.mergedIntoId], transaction);
      const dupes = (await this.notesOf(sessionId, duplicateIds, transaction)).filter((d) => d.id !== keep!.id);
      if (dupes.length === 0) throw errors.badRequest('Choose at least one other note to merge', because('merge_needs_other'));
      if (dupes.some((d) => d.itemId !== keep!.itemId)) throw errors.badRequest('Only notes of the same activity can be merged', because('merge_same_activity'));
      const ids = dupes.map((d) => d.id);
      // Notes already merged into a duplicate follow it under the kept note.
      await Submission.update({ mergedIntoId: keep!.id }, { where: { sessionId, mergedIntoId: ids }, transaction });
      await Submission.update({ mergedIntoId: keep!.id, themeId: null }, { where: { sessionId, id: ids }, transaction });
      return Submission.findAll({ where: { sessionId, id: [keep!.id, ...ids] }, transaction });
    });
    this.activities.changed(sessionId, rows[0]!.itemId, this.activities.everyone(sessionId));
    return this.activities.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** A merged duplicate stands on its own again. */
  async unmerge(sessionId: string, noteId: string): Promise<NoteView[]> {
    const rows = await this.ctx.db.writeTx(async (transaction) => {
      const [note] = await this.notesOf(sessionId, [noteId], transaction);
      if (!note!.mergedIntoId) return [note!];
      const keep = note!.mergedIntoId;
      note!.mergedIntoId = null;
      await note!.save({ transaction });
      return [note!, ...(await this.notesOf(sessionId, [keep], transaction))];
    });
    this.activities.changed(sessionId, rows[0]!.itemId, this.activities.everyone(sessionId));
    return this.activities.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** A new affinity theme at the end of the item's themes, with the given notes moved into it. */
  async createTheme(sessionId: string, itemId: string, name: string, noteIds: string[]): Promise<ThemeView> {
    await this.activities.itemOf(sessionId, itemId);
    const theme = await this.ctx.db.writeTx(async (transaction) => {
      const made = await this.makeTheme(sessionId, itemId, name, transaction);
      if (noteIds.length) await this.moveNotes(sessionId, itemId, made.id, noteIds, transaction);
      return made;
    });
    this.activities.changed(sessionId, itemId);
    return toTheme(theme);
  }

  /** Accepts suggested themes as the facilitator changed them: one theme a group, each note in one group at most. */
  async applyThemes(sessionId: string, itemId: string, groups: { name: string; noteIds: string[] }[]): Promise<ThemeView[]> {
    await this.activities.itemOf(sessionId, itemId);
    const all = groups.flatMap((g) => g.noteIds);
    if (new Set(all).size !== all.length) throw errors.badRequest('A note can be in one theme only', because('one_theme_each'));
    const made = await this.ctx.db.writeTx(async (transaction) => {
      const out = [];
      for (const g of groups) {
        const theme = await this.makeTheme(sessionId, itemId, g.name, transaction);
        await this.moveNotes(sessionId, itemId, theme.id, g.noteIds, transaction);
        out.push(theme);
      }
      return out;
    });
    this.activities.changed(sessionId, itemId);
    return made.map(toTheme);
  }

  /** Renames a theme; a promotion of it takes the new name, since it stands for the same group of notes. */
  async renameTheme(sessionId: string, themeId: string, name: string): Promise<ThemeView> {
    const { Promotion } = this.ctx.db.models;
    const theme = await this.ctx.db.writeTx(async (transaction) => {
      const t = await this.themeOf(sessionId, themeId, transaction);
      t.name = name;
      await t.save({ transaction });
      await Promotion.update({ text: name }, { where: { sessionId, sourceKind: 'theme', sourceId: themeId }, transaction });
      return t;
    });
    this.activities.changed(sessionId, theme.itemId);
    this.announcePromotions(sessionId);
    return toTheme(theme);
  }

  /** Removes a theme; its notes go back to the ungrouped ones (a promotion of it stays, as the option it became). */
  async deleteTheme(sessionId: string, themeId: string): Promise<{ id: string }> {
    const { Submission } = this.ctx.db.models;
    const itemId = await this.ctx.db.writeTx(async (transaction) => {
      const t = await this.themeOf(sessionId, themeId, transaction);
      await Submission.update({ themeId: null }, { where: { sessionId, themeId }, transaction });
      await t.destroy({ transaction });
      return t.itemId;
    });
    this.activities.changed(sessionId, itemId);
    return { id: themeId };
  }

  /** Moves notes into a theme (dropped on it), or back to the ungrouped ones with `themeId` null. */
  async assignTheme(sessionId: string, themeId: string | null, noteIds: string[]): Promise<NoteView[]> {
    const rows = await this.ctx.db.writeTx(async (transaction) => {
      const itemId = themeId
        ? (await this.themeOf(sessionId, themeId, transaction)).itemId
        : (await this.notesOf(sessionId, noteIds.slice(0, 1), transaction))[0]!.itemId;
      return this.moveNotes(sessionId, itemId, themeId, noteIds, transaction);
    });
    this.activities.changed(sessionId, rows[0]!.itemId);
    return this.activities.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** Makes a note or a theme an option of a later vote, keeping its text; promoting it again answers with the first promotion. */
  async promote(sessionId: string, sourceKind: 'note' | 'theme', sourceId: string): Promise<PromotedOption> {
    const { Promotion } = this.ctx.db.models;
    const made = await this.ctx.db.writeTx(async (transaction) => {
      const existing = await Promotion.findOne({ where: { sessionId, sourceKind, sourceId }, transaction });
      if (existing) return existing;
      let source: { itemId: string; text: string };
      if (sourceKind === 'theme') {
        const t = await this.themeOf(sessionId, sourceId, transaction);
        source = { itemId: t.itemId, text: t.name };
      } else {
        const [n] = await this.notesOf(sessionId, [sourceId], transaction);
        if (n!.mergedIntoId) throw errors.badRequest('That note was merged into another; promote the note it went under', because('promote_merged'));
        if (n!.hidden) throw errors.badRequest('That note is hidden; show it again before promoting it', because('promote_hidden'));
        source = { itemId: n!.itemId, text: n!.text };
      }
      const position = (((await Promotion.max('position', { where: { sessionId }, transaction })) as number | null) ?? -1) + 1;
      return Promotion.create(
        { id: crypto.randomUUID(), sessionId, itemId: source.itemId, sourceKind, sourceId, text: source.text, position, createdAt: new Date() },
        { transaction },
      );
    });
    this.activities.changed(sessionId, made.itemId, [liveRooms.facilitators(sessionId)]);
    this.announcePromotions(sessionId);
    return toPromoted(made);
  }

  /** Takes a promotion back; answers with the session's promotions left. */
  async unpromote(sessionId: string, promotionId: string): Promise<PromotedOption[]> {
    const { Promotion } = this.ctx.db.models;
    const itemId = await this.ctx.db.writeTx(async (transaction) => {
      const p = await Promotion.findByPk(promotionId, { transaction });
      if (!p || p.sessionId !== sessionId) throw errors.notFound('promotion');
      await p.destroy({ transaction });
      return p.itemId;
    });
    this.activities.changed(sessionId, itemId, [liveRooms.facilitators(sessionId)]);
    this.announcePromotions(sessionId);
    return this.promoted(sessionId);
  }

  /** The session's promoted notes and themes in the order they were promoted, or one item's. */
  async promoted(sessionId: string, itemId?: string): Promise<PromotedOption[]> {
    const rows = await this.ctx.db.models.Promotion.findAll({
      where: itemId ? { sessionId, itemId } : { sessionId },
      order: [['position', 'ASC']],
    });
    return rows.map(toPromoted);
  }

  /** Sends the console the session's promotions as they are now. */
  private announcePromotions(sessionId: string): void {
    if (!this.ctx.announcer.active) return;
    void this.promoted(sessionId)
      .then((list) => this.ctx.announcer.announce(liveRooms.facilitators(sessionId), 'promotions:updated', list))
      .catch((err: unknown) => {
        if (!this.ctx.announcer.isClosed) this.ctx.logger.error({ err }, 'could not announce the promotions');
      });
  }

  /** Notes of the session by id (all must exist in it), for moderation. */
  private async notesOf(sessionId: string, ids: string[], transaction: Transaction): Promise<SubmissionRow[]> {
    const rows = await this.ctx.db.models.Submission.findAll({ where: { sessionId, id: ids }, transaction });
    if (rows.length !== new Set(ids).size) throw errors.notFound('notes');
    return rows;
  }

  /** A theme of the session, or 404. */
  private async themeOf(sessionId: string, themeId: string, transaction: Transaction) {
    const t = await this.ctx.db.models.Theme.findByPk(themeId, { transaction });
    if (!t || t.sessionId !== sessionId) throw errors.notFound('theme');
    return t;
  }

  /** A new theme at the end of the item's themes. */
  private async makeTheme(sessionId: string, itemId: string, name: string, transaction: Transaction) {
    const { Theme } = this.ctx.db.models;
    const position = (((await Theme.max('position', { where: { sessionId, itemId }, transaction })) as number | null) ?? -1) + 1;
    return Theme.create({ id: crypto.randomUUID(), sessionId, itemId, name, position }, { transaction });
  }

  /** Moves notes of one item into a theme (or out of any with `null`), refusing other items' notes and merged duplicates. */
  private async moveNotes(sessionId: string, itemId: string, themeId: string | null, noteIds: string[], transaction: Transaction) {
    const rows = await this.notesOf(sessionId, noteIds, transaction);
    if (rows.some((r) => r.itemId !== itemId)) throw errors.badRequest('A theme groups notes of its own activity only', because('theme_own_activity'));
    if (rows.some((r) => r.mergedIntoId)) throw errors.badRequest('A merged duplicate goes with the note it was merged into', because('theme_merged'));
    await this.ctx.db.models.Submission.update({ themeId }, { where: { sessionId, id: noteIds }, transaction });
    for (const r of rows) r.themeId = themeId;
    return rows;
  }
}
