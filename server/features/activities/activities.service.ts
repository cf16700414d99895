import crypto from 'node:crypto';
import type { Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { ActivityStateRow, AgendaItemRow, ParticipantRow, PhotoRow, SubmissionRow } from '../../db/models';
import { AppError, errors } from '../../common/errors';
import { liveRooms, type LiveService } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import type { SubmissionsService } from '../live/submissions.service';
import { photoCleared } from './photos.service';
import { pairsForRound, roundRobinLength, testRotation } from '../../../shared/rotations';
import { fieldErrors } from '../../../shared/errors';
import { LIVE_TEAM_TYPES, MODERATED_TYPES, PAIRED_TYPES, ROUND_TYPES, notePartsFor, noteRefusal, storyKey, storyOwner } from '../../../shared/activities';
import type { ActivityType } from '../../../shared/schemas/agenda-item';
import type { SubmissionInput, SubmissionView } from '../../../shared/schemas/live';
import {
  guidedFieldsSchema,
  type ActivityBoard,
  type NoteView,
  type PersonRef,
  type PhotoView,
  type PromotedOption,
  type RoundView,
  type TeamRef,
  type ThemeView,
} from '../../../shared/schemas/activities';

/** Who is looking at a board: the console (everything), the room (the projector and watchers), or one phone. */
export type Viewer = { kind: 'console' } | { kind: 'room' } | { kind: 'phone'; participantId: string };

/** Changes to one item within this window are announced together, so a room typing at once costs a few broadcasts. */
const CHANGE_TICK_MS = 250;
/** The announcer's keys of board changes start with this (a photo-consent change sends them all at once). */
const BOARD_KEY = 'board:';

const refuse = (message: string) => new AppError(400, 'bad_request', message);

/** Everything needed to show notes: people, photos and duplicates, read once per board. */
interface NoteContext {
  names: Map<string, string>;
  consent: Map<string, boolean>;
  photos: Map<string, PhotoRow>;
  duplicates: Map<string, number>;
}

/**
 * The activities of a live session beyond plain notes: each activity's rules for submissions,
 * the boards each screen sees, moderation (hide, merge, affinity themes, promotion to a later vote),
 * rounds of rotating pairs and test visits, and the storyboards' frame order. Writes go through
 * the writer queue first; broadcasts follow the commit.
 */
export class ActivitiesService {
  constructor(
    private ctx: AppContext,
    private live: LiveService,
    private presence: PresenceService,
    submissions: SubmissionsService,
  ) {
    submissions.addSubmissionCheck((input, participant, transaction) => this.checkSubmission(input, participant, transaction));
    presence.onConsentChanged((sessionId, participantId) => {
      this.photosOfChanged(sessionId, participantId).catch((err: unknown) => {
        if (!this.ctx.announcer.isClosed) this.ctx.logger.error({ err }, 'could not announce a change of photo consent');
      });
    });
    submissions.onSubmissionCreated((view) => {
      this.afterSubmission(view).catch((err: unknown) => {
        if (!this.ctx.announcer.isClosed) this.ctx.logger.error({ err }, 'could not announce a new note');
      });
    });
  }


  /**
   * The rules each activity adds to a submission, run by the live service inside its write
   * transaction: parts must be the activity's, guided sentences complete, photos the sender's own,
   * feedback aimed at someone else's sketch or another team's prototype.
   */
  async checkSubmission(input: SubmissionInput, participant: ParticipantRow, transaction: Transaction): Promise<void> {
    const { AgendaItem, Submission, Team, Participant, Photo } = this.ctx.db.models;
    const item = await AgendaItem.findByPk(input.itemId, { transaction });
    if (!item) throw errors.notFound('That activity');
    // A talk, a break or a vote takes no notes at all; every other activity only its own kinds.
    const refusal = noteRefusal(item.type as ActivityType, input.kind);
    if (refusal) throw refuse(refusal);
    if (!MODERATED_TYPES.has(item.type as ActivityType)) return;
    const type = item.type as ActivityType;
    const parts = notePartsFor(type, item.settings);
    // An activity with parts files every note under one (the phone always offers them); one without takes none.
    if ((parts.length > 0 && input.part === undefined) || (input.part !== undefined && !parts.some((p) => p.id === input.part))) {
      throw refuse(
        parts.length
          ? `File the note under one of: ${parts.map((p) => p.label).join(', ')}`
          : 'This activity does not file notes under parts; send the note on its own',
      );
    }
    const fields = input.fields ?? {};
    const only = (allowed: string[]) => {
      const extra = Object.keys(fields).filter((k) => !allowed.includes(k));
      if (extra.length) throw refuse(`This note cannot carry: ${extra.join(', ')}`);
    };
    const ownPhoto = async () => {
      const photo = await Photo.findByPk(fields.photoId ?? '', { transaction });
      // The photo's submission carries the upload's own clientId, so each photo has one submission, its uploader's.
      if (!photo || photo.participantId !== participant.id || photo.clientId !== input.clientId || photo.itemId !== input.itemId) {
        throw refuse('Upload the photo first; a photo goes with the note it was uploaded for');
      }
    };

    switch (input.kind) {
      case 'point_of_view':
      case 'how_might_we': {
        const r = guidedFieldsSchema(input.kind).safeParse(fields);
        if (!r.success) throw new AppError(400, 'validation_failed', Object.values(fieldErrors(r.error)).join('; '));
        return;
      }
      case 'sketch':
        if (type !== 'sketch') throw refuse('Sketch photos go to a sketch activity');
        only(['photoId']);
        return ownPhoto();
      case 'frame':
        if (type !== 'storyboard') throw refuse('Frames go to a storyboard activity');
        only(['photoId']);
        if (fields.photoId !== undefined) await ownPhoto();
        return;
      case 'feedback': {
        if (type === 'sketch') {
          only(['sketchId']);
          const sketch = await Submission.findByPk(fields.sketchId ?? '', { transaction });
          if (!sketch || sketch.kind !== 'sketch' || sketch.sessionId !== participant.sessionId || sketch.itemId !== input.itemId || sketch.hidden) {
            throw refuse('That sketch is not in this activity any more');
          }
          if (sketch.participantId === participant.id) throw refuse('Feedback is for the others’ sketches; yours gets theirs');
          return;
        }
        if (type === 'test_rounds') {
          only(['hostTeamId', 'round']);
          if (input.part === undefined) throw refuse('File the feedback under one part of the grid');
          const host = await Team.findByPk(fields.hostTeamId ?? '', { transaction });
          if (!host || host.sessionId !== participant.sessionId || host.retiredAt) throw refuse('Choose the team whose prototype you tested');
          if (host.id === participant.teamId) throw refuse('Test another team’s prototype, not your own team’s');
          if (fields.round !== undefined && !/^\d{1,2}$/.test(fields.round)) throw refuse('The round is a number');
          return;
        }
        throw refuse('Feedback goes to a sketch or a test round');
      }
      default: {
        if (type === 'interview') {
          only(['partnerId', 'round']);
          if (fields.partnerId !== undefined) {
            const partner = await Participant.findByPk(fields.partnerId, { attributes: ['id', 'sessionId'], transaction });
            if (!partner || partner.sessionId !== participant.sessionId || partner.id === participant.id) {
              throw refuse('Notes are about your partner in this session');
            }
          }
          if (fields.round !== undefined && !/^\d{1,2}$/.test(fields.round)) throw refuse('The round is a number');
          return;
        }
        only([]);
      }
    }
  }

  /** Tells the screens about a new submission: the console and projector refetch, teammates get the note itself. */
  private async afterSubmission(view: SubmissionView): Promise<void> {
    const { AgendaItem, Submission } = this.ctx.db.models;
    const item = await AgendaItem.findByPk(view.itemId, { attributes: ['id', 'type'] });
    if (!item || !MODERATED_TYPES.has(item.type as ActivityType)) return;
    const row = await Submission.findByPk(view.id);
    if (!row) return;
    const sessionId = row.sessionId;
    const rooms = [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId)];
    if (LIVE_TEAM_TYPES.has(item.type as ActivityType) && row.teamId && this.ctx.announcer.active) {
      // As a teammate's phone sees it: named, and a photo blurred unless cleared.
      const [note] = await this.notesFor(sessionId, [row], { kind: 'phone', participantId: '' });
      if (note) this.ctx.announcer.announce(liveRooms.team(row.teamId), 'notes:added', note);
    }
    // Every phone shows the sketch gallery; a tested team reads its feedback; a sketch's team reads theirs.
    if (item.type === 'sketch') rooms.push(liveRooms.session(sessionId));
    if (item.type === 'test_rounds' && row.fields?.hostTeamId) rooms.push(liveRooms.team(row.fields.hostTeamId));
    this.changed(sessionId, row.itemId, rooms);
  }

  /**
   * Tells every screen to read again the boards that show a participant's photos (their consent
   * changed, so the photos are blurred or shown): the projector and the other phones follow at once.
   */
  private async photosOfChanged(sessionId: string, participantId: string): Promise<void> {
    const rows = await this.ctx.db.models.Photo.findAll({ where: { sessionId, participantId }, attributes: ['itemId'] });
    for (const itemId of new Set(rows.map((r) => r.itemId))) this.changed(sessionId, itemId, this.everyone(sessionId));
    // A consent change is rare and must reach the room at once (a photo blurred within a second): no waiting for the tick.
    if (rows.length) this.ctx.announcer.flush(BOARD_KEY);
  }

  /** Tells every screen to read every board of the session again (a participant removed all they wrote). */
  async everythingChanged(sessionId: string): Promise<void> {
    const workshopId = await this.live.workshopOf(sessionId);
    const items = await this.ctx.db.models.AgendaItem.findAll({ where: { workshopId }, attributes: ['id'] });
    for (const { id } of items) this.changed(sessionId, id, this.everyone(sessionId));
  }

  /** What a screen shows of an item: the console everything; the room what is visible, without names; a phone its own and its team's. */
  async board(sessionId: string, itemId: string, viewer: Viewer): Promise<ActivityBoard> {
    const item = await this.itemOf(sessionId, itemId);
    const { Submission, Theme, ActivityState, Promotion } = this.ctx.db.models;
    const [rows, themes, state, teams] = await Promise.all([
      Submission.findAll({ where: { sessionId, itemId }, order: [['createdAt', 'ASC']] }),
      Theme.findAll({ where: { sessionId, itemId }, order: [['position', 'ASC']] }),
      ActivityState.findOne({ where: { sessionId, itemId } }),
      this.teams(sessionId),
    ]);
    let shown = rows;
    let frameOrders = state?.frameOrders ?? {};
    if (viewer.kind === 'room') shown = rows.filter((r) => !r.hidden && !r.mergedIntoId);
    if (viewer.kind === 'phone') {
      const me = viewer.participantId;
      const myTeam = teams.find((t) => t.memberIds.includes(me))?.id ?? null;
      const byId = new Map(rows.map((r) => [r.id, r]));
      const sameTeam = (r: SubmissionRow) => myTeam !== null && r.teamId === myTeam;
      shown = rows.filter((r) => {
        // A merged duplicate stays on its writer's phone (marked as merged there); the others see the kept note.
        if (r.participantId === me) return true;
        if (r.mergedIntoId) return false;
        if (r.hidden) return false;
        if (LIVE_TEAM_TYPES.has(item.type as ActivityType)) return sameTeam(r);
        if (r.kind === 'sketch') return true;
        if (r.kind === 'feedback' && r.fields?.sketchId) {
          const sketch = byId.get(r.fields.sketchId);
          return !!sketch && (sketch.participantId === me || sameTeam(sketch));
        }
        if (r.kind === 'feedback' && r.fields?.hostTeamId) return myTeam !== null && r.fields.hostTeamId === myTeam;
        return false;
      });
      const myKey = storyKey({ teamId: myTeam, participantId: me });
      frameOrders = frameOrders[myKey] ? { [myKey]: frameOrders[myKey] } : {};
    }
    const notes = await this.notesFor(sessionId, shown, viewer, rows);
    const promotions =
      viewer.kind === 'console' ? (await Promotion.findAll({ where: { sessionId, itemId }, order: [['position', 'ASC']] })).map(toPromoted) : [];
    return {
      itemId,
      notes,
      themes: viewer.kind === 'phone' ? [] : themes.map(toTheme),
      teams,
      frameOrders,
      promotions,
    };
  }

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
    for (const itemId of new Set(rows.map((r) => r.itemId))) this.changed(sessionId, itemId, this.everyone(sessionId));
    return this.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** Merges duplicates under the note to keep (a kept note that was itself merged hands over to the one it went under). */
  async merge(sessionId: string, keepId: string, duplicateIds: string[]): Promise<NoteView[]> {
    const { Submission } = this.ctx.db.models;
    const rows = await this.ctx.db.writeTx(async (transaction) => {
      let [keep] = await this.notesOf(sessionId, [keepId], transaction);
      if (keep!.mergedIntoId) [keep] = await this.notesOf(sessionId, [keep!.mergedIntoId], transaction);
      const dupes = (await this.notesOf(sessionId, duplicateIds, transaction)).filter((d) => d.id !== keep!.id);
      if (dupes.length === 0) throw refuse('Choose at least one other note to merge');
      if (dupes.some((d) => d.itemId !== keep!.itemId)) throw refuse('Only notes of the same activity can be merged');
      const ids = dupes.map((d) => d.id);
      // Notes already merged into a duplicate follow it under the kept note.
      await Submission.update({ mergedIntoId: keep!.id }, { where: { sessionId, mergedIntoId: ids }, transaction });
      await Submission.update({ mergedIntoId: keep!.id, themeId: null }, { where: { sessionId, id: ids }, transaction });
      return Submission.findAll({ where: { sessionId, id: [keep!.id, ...ids] }, transaction });
    });
    this.changed(sessionId, rows[0]!.itemId, this.everyone(sessionId));
    return this.notesFor(sessionId, rows, { kind: 'console' });
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
    this.changed(sessionId, rows[0]!.itemId, this.everyone(sessionId));
    return this.notesFor(sessionId, rows, { kind: 'console' });
  }

  /** A new affinity theme at the end of the item's themes, with the given notes moved into it. */
  async createTheme(sessionId: string, itemId: string, name: string, noteIds: string[]): Promise<ThemeView> {
    await this.itemOf(sessionId, itemId);
    const theme = await this.ctx.db.writeTx(async (transaction) => {
      const made = await this.makeTheme(sessionId, itemId, name, transaction);
      if (noteIds.length) await this.moveNotes(sessionId, itemId, made.id, noteIds, transaction);
      return made;
    });
    this.changed(sessionId, itemId);
    return toTheme(theme);
  }

  /** Accepts suggested themes as the facilitator changed them: one theme a group, each note in one group at most. */
  async applyThemes(sessionId: string, itemId: string, groups: { name: string; noteIds: string[] }[]): Promise<ThemeView[]> {
    await this.itemOf(sessionId, itemId);
    const all = groups.flatMap((g) => g.noteIds);
    if (new Set(all).size !== all.length) throw refuse('A note can be in one theme only');
    const made = await this.ctx.db.writeTx(async (transaction) => {
      const out = [];
      for (const g of groups) {
        const theme = await this.makeTheme(sessionId, itemId, g.name, transaction);
        await this.moveNotes(sessionId, itemId, theme.id, g.noteIds, transaction);
        out.push(theme);
      }
      return out;
    });
    this.changed(sessionId, itemId);
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
    this.changed(sessionId, theme.itemId);
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
    this.changed(sessionId, itemId);
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
    this.changed(sessionId, rows[0]!.itemId);
    return this.notesFor(sessionId, rows, { kind: 'console' });
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
        if (n!.mergedIntoId) throw refuse('That note was merged into another; promote the note it went under');
        if (n!.hidden) throw refuse('That note is hidden; show it again before promoting it');
        source = { itemId: n!.itemId, text: n!.text };
      }
      const position = (((await Promotion.max('position', { where: { sessionId }, transaction })) as number | null) ?? -1) + 1;
      return Promotion.create(
        { id: crypto.randomUUID(), sessionId, itemId: source.itemId, sourceKind, sourceId, text: source.text, position, createdAt: new Date() },
        { transaction },
      );
    });
    this.changed(sessionId, made.itemId, [liveRooms.facilitators(sessionId)]);
    this.announcePromotions(sessionId);
    return toPromoted(made);
  }

  /** Takes a promotion back; answers with the session's promotions left. */
  async unpromote(sessionId: string, promotionId: string): Promise<PromotedOption[]> {
    const { Promotion } = this.ctx.db.models;
    const itemId = await this.ctx.db.writeTx(async (transaction) => {
      const p = await Promotion.findByPk(promotionId, { transaction });
      if (!p || p.sessionId !== sessionId) throw errors.notFound('That promotion');
      await p.destroy({ transaction });
      return p.itemId;
    });
    this.changed(sessionId, itemId, [liveRooms.facilitators(sessionId)]);
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

  /** The current round of an item run in rounds; the first look draws the pairs from whoever is online. */
  async round(sessionId: string, itemId: string): Promise<RoundView> {
    const item = await this.itemOf(sessionId, itemId);
    if (!ROUND_TYPES.has(item.type as ActivityType)) throw refuse('This activity does not run in rounds');
    let state = await this.ctx.db.models.ActivityState.findOne({ where: { sessionId, itemId } });
    if (!state || (PAIRED_TYPES.has(item.type as ActivityType) && state.roster === null)) {
      state = await this.ctx.db.writeTx((transaction) => this.stateFor(sessionId, item, transaction));
    }
    return this.roundView(sessionId, item, state);
  }

  /** Goes to a round (the console's next and back), or draws the pairs again from whoever is online now; every screen hears it. */
  async setRound(sessionId: string, itemId: string, round: number, regroup: boolean): Promise<RoundView> {
    const item = await this.itemOf(sessionId, itemId);
    if (!ROUND_TYPES.has(item.type as ActivityType)) throw refuse('This activity does not run in rounds');
    const state = await this.ctx.db.writeTx(async (transaction) => {
      const s = await this.stateFor(sessionId, item, transaction, regroup);
      if (!regroup && round > s.round && PAIRED_TYPES.has(item.type as ActivityType)) await this.addLateJoiners(sessionId, s);
      s.round = round;
      await s.save({ transaction });
      return s;
    });
    const view = await this.roundView(sessionId, item, state);
    this.ctx.announcer.announce(liveRooms.session(sessionId), 'rounds:updated', view);
    return view;
  }

  /** A phone puts its own team's storyboard in order. */
  async reorderFrames(sessionId: string, participantId: string, itemId: string, frameIds: string[]): Promise<string[]> {
    const p = await this.presence.participantOf(participantId, sessionId);
    if (!p) throw errors.notInSession();
    return this.arrangeFrames(sessionId, itemId, storyKey({ teamId: p.teamId, participantId: p.id }), frameIds);
  }

  /**
   * Puts one story's frames in order: the given ids first, then any frame not named (e.g. one added
   * meanwhile) in the order it came. Answers with the order stored.
   */
  async arrangeFrames(sessionId: string, itemId: string, key: string, frameIds: string[]): Promise<string[]> {
    const item = await this.itemOf(sessionId, itemId);
    if (item.type !== 'storyboard') throw refuse('Only a storyboard has frames to put in order');
    if (new Set(frameIds).size !== frameIds.length) throw refuse('Each frame can be in the story once');
    const { Submission } = this.ctx.db.models;
    const order = await this.ctx.db.writeTx(async (transaction) => {
      const frames = (await Submission.findAll({ where: { sessionId, itemId, kind: 'frame' }, order: [['createdAt', 'ASC']], transaction })).filter(
        (f) => storyKey(f) === key && !f.mergedIntoId,
      );
      const known = new Set(frames.map((f) => f.id));
      if (frameIds.some((id) => !known.has(id))) throw refuse('Those frames are not all in this storyboard');
      const full = [...frameIds, ...frames.map((f) => f.id).filter((id) => !frameIds.includes(id))];
      const state = await this.stateFor(sessionId, item, transaction);
      state.frameOrders = { ...state.frameOrders, [key]: full };
      state.changed('frameOrders', true);
      await state.save({ transaction });
      return full;
    });
    const owner = storyOwner(key);
    const storyRoom = 'teamId' in owner ? liveRooms.team(owner.teamId) : liveRooms.participant(owner.participantId);
    this.changed(sessionId, itemId, [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId), storyRoom]);
    return order;
  }

  /** The session's teams in order, with their members' ids. */
  async teams(sessionId: string): Promise<TeamRef[]> {
    const { Team, Participant } = this.ctx.db.models;
    const [teams, people] = await Promise.all([
      Team.findAll({ where: { sessionId, retiredAt: null }, order: [['position', 'ASC']] }),
      Participant.findAll({ where: { sessionId }, attributes: ['id', 'teamId', 'joinedAt'], order: [['joinedAt', 'ASC']] }),
    ]);
    return teams.map((t) => ({ id: t.id, name: t.name, memberIds: people.filter((p) => p.teamId === t.id).map((p) => p.id) }));
  }

  /** An agenda item of the session's workshop, or 404. */
  async itemOf(sessionId: string, itemId: string): Promise<AgendaItemRow> {
    const workshopId = await this.live.workshopOf(sessionId);
    const item = await this.ctx.db.models.AgendaItem.findOne({ where: { id: itemId, workshopId } });
    if (!item) throw errors.notFound('That agenda item');
    return item;
  }

  /** Announces that an item's board changed, to the console and the room (and more rooms when given), a few times a second at most. */
  changed(sessionId: string, itemId: string, rooms: string[] = [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId)]): void {
    // The rooms of the changes that waited go in one send, which reaches each socket once.
    this.ctx.announcer.announceSoon(`${BOARD_KEY}${sessionId}|${itemId}`, rooms, 'activity:changed', { itemId }, { afterMs: CHANGE_TICK_MS, what: 'a board change' });
  }

  private everyone(sessionId: string): string[] {
    return [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId), liveRooms.session(sessionId)];
  }

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
    if (rows.length !== new Set(ids).size) throw errors.notFound('One of those notes');
    return rows;
  }

  private async themeOf(sessionId: string, themeId: string, transaction: Transaction) {
    const t = await this.ctx.db.models.Theme.findByPk(themeId, { transaction });
    if (!t || t.sessionId !== sessionId) throw errors.notFound('That theme');
    return t;
  }

  private async makeTheme(sessionId: string, itemId: string, name: string, transaction: Transaction) {
    const { Theme } = this.ctx.db.models;
    const position = (((await Theme.max('position', { where: { sessionId, itemId }, transaction })) as number | null) ?? -1) + 1;
    return Theme.create({ id: crypto.randomUUID(), sessionId, itemId, name, position }, { transaction });
  }

  private async moveNotes(sessionId: string, itemId: string, themeId: string | null, noteIds: string[], transaction: Transaction) {
    const rows = await this.notesOf(sessionId, noteIds, transaction);
    if (rows.some((r) => r.itemId !== itemId)) throw refuse('A theme groups notes of its own activity only');
    if (rows.some((r) => r.mergedIntoId)) throw refuse('A merged duplicate goes with the note it was merged into');
    await this.ctx.db.models.Submission.update({ themeId }, { where: { sessionId, id: noteIds }, transaction });
    for (const r of rows) r.themeId = themeId;
    return rows;
  }

  /**
   * People who joined after the pairs were drawn and are online join the rotation from the next round
   * on, so nobody waits for the facilitator to pair everyone again (the pairs of later rounds change).
   */
  private async addLateJoiners(sessionId: string, state: ActivityStateRow): Promise<void> {
    const inRoster = new Set(state.roster ?? []);
    const late = (await this.presence.participants(sessionId)).filter((p) => p.online && !inRoster.has(p.id)).map((p) => p.id);
    if (late.length === 0) return;
    state.roster = [...(state.roster ?? []), ...late];
    state.changed('roster', true);
  }

  /** The item's state, made on first use; pairs are drawn then (or again with `regroup`) from whoever is online. */
  private async stateFor(sessionId: string, item: AgendaItemRow, transaction: Transaction, regroup = false): Promise<ActivityStateRow> {
    const { ActivityState } = this.ctx.db.models;
    let state = await ActivityState.findOne({ where: { sessionId, itemId: item.id }, transaction });
    state ??= ActivityState.build({ id: crypto.randomUUID(), sessionId, itemId: item.id, round: 0, roster: null, frameOrders: {} });
    if (PAIRED_TYPES.has(item.type as ActivityType) && (state.roster === null || regroup)) {
      const people = await this.presence.participants(sessionId);
      const online = people.filter((p) => p.online);
      // Pair whoever is here; before anyone's phone is connected, everyone who joined.
      state.roster = (online.length ? online : people).map((p) => p.id);
      state.changed('roster', true);
    }
    await state.save({ transaction });
    return state;
  }

  private async roundView(sessionId: string, item: AgendaItemRow, state: ActivityStateRow): Promise<RoundView> {
    const people = await this.ctx.db.models.Participant.findAll({ where: { sessionId }, attributes: ['id', 'displayName', 'joinedAt'], order: [['joinedAt', 'ASC']] });
    const person = new Map<string, PersonRef>(people.map((p) => [p.id, { id: p.id, displayName: p.displayName }]));
    const teams = await this.teams(sessionId);
    const base = { itemId: item.id, round: state.round, pairs: [], resting: null, newcomers: [], visits: [], teams };
    if (item.type === 'test_rounds') {
      const hosts = teams.filter((t) => t.memberIds.length > 0);
      const roundCount = item.settings.rounds ?? Math.max(1, hosts.length - 1);
      const teamOf = new Map(hosts.flatMap((t) => t.memberIds.map((m) => [m, t.id] as const)));
      const visits = hosts.length < 2 ? [] : testRotation(hosts, state.round + 1)[state.round]!.visits;
      return {
        ...base,
        roundCount,
        visits: visits.map((v) => ({ tester: person.get(v.testerId)!, testerTeamId: teamOf.get(v.testerId)!, hostTeamId: v.hostTeamId })),
      };
    }
    // Someone who left the session (their data deleted) drops out of the rotation.
    const roster = (state.roster ?? []).filter((id) => person.has(id));
    const { pairs, resting } = pairsForRound(roster, state.round);
    const inRoster = new Set(roster);
    return {
      ...base,
      roundCount: item.settings.rounds ?? roundRobinLength(roster.length),
      pairs: pairs.map(([a, b]) => ({ a: person.get(a)!, b: person.get(b)! })),
      resting: resting ? person.get(resting)! : null,
      newcomers: people.filter((p) => !inRoster.has(p.id)).map((p) => person.get(p.id)!),
    };
  }

  /**
   * Notes as a viewer sees them. `all` (the item's every row) counts the duplicates; without it
   * they are read. A photo is blurred unless cleared, except on its uploader's own phone.
   */
  private async notesFor(sessionId: string, rows: SubmissionRow[], viewer: Viewer, all?: SubmissionRow[]): Promise<NoteView[]> {
    const nc = await this.noteContext(sessionId, rows, all);
    return rows.map((r) => {
      const photoRow = r.fields?.photoId ? nc.photos.get(r.fields.photoId) : undefined;
      let photo: PhotoView | null = null;
      if (photoRow) {
        const own = viewer.kind === 'phone' && viewer.participantId === photoRow.participantId;
        photo = {
          id: photoRow.id,
          width: photoRow.width,
          height: photoRow.height,
          showsPeople: photoRow.showsPeople,
          blurred: !own && !photoCleared(photoRow, nc.consent.get(photoRow.participantId) ?? false),
        };
      }
      const named = viewer.kind !== 'room';
      return {
        id: r.id,
        itemId: r.itemId,
        kind: r.kind,
        part: r.part,
        text: r.text,
        fields: r.fields,
        teamId: r.teamId,
        storyKey: storyKey(r),
        themeId: r.themeId,
        mergedIntoId: r.mergedIntoId ?? null,
        duplicates: nc.duplicates.get(r.id) ?? 0,
        hidden: r.hidden,
        participantId: named ? r.participantId : null,
        displayName: named ? (nc.names.get(r.participantId) ?? '') : null,
        photo,
        createdAt: r.createdAt.getTime(),
      };
    });
  }

  private async noteContext(sessionId: string, rows: SubmissionRow[], all?: SubmissionRow[]): Promise<NoteContext> {
    const { Participant, Photo, Submission } = this.ctx.db.models;
    const photoIds = rows.map((r) => r.fields?.photoId).filter((id): id is string => !!id);
    const ids = rows.map((r) => r.id);
    const [people, photos, merged] = await Promise.all([
      Participant.findAll({ where: { sessionId }, attributes: ['id', 'displayName', 'photoConsent'] }),
      photoIds.length ? Photo.findAll({ where: { id: photoIds } }) : Promise.resolve([] as PhotoRow[]),
      all ? Promise.resolve(all) : ids.length ? Submission.findAll({ where: { sessionId, mergedIntoId: ids }, attributes: ['id', 'mergedIntoId'] }) : Promise.resolve([] as SubmissionRow[]),
    ]);
    const duplicates = new Map<string, number>();
    for (const m of merged) if (m.mergedIntoId) duplicates.set(m.mergedIntoId, (duplicates.get(m.mergedIntoId) ?? 0) + 1);
    return {
      names: new Map(people.map((p) => [p.id, p.displayName])),
      consent: new Map(people.map((p) => [p.id, p.photoConsent])),
      photos: new Map(photos.map((p) => [p.id, p])),
      duplicates,
    };
  }
}

function toTheme(t: { id: string; name: string; position: number }): ThemeView {
  return { id: t.id, name: t.name, position: t.position };
}

function toPromoted(p: { id: string; text: string; sourceKind: 'note' | 'theme'; sourceId: string; itemId: string }): PromotedOption {
  return { id: p.id, text: p.text, sourceKind: p.sourceKind, sourceId: p.sourceId, itemId: p.itemId };
}
