import crypto from 'node:crypto';
import type { Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { ActivityStateRow, AgendaItemRow, ParticipantRow, PhotoRow, SubmissionRow } from '../../db/models';
import { because, errors } from '../../common/errors';
import { liveRooms, type LiveService } from '../live/live.service';
import type { PresenceService } from '../live/presence.service';
import type { SubmissionsService } from '../live/submissions.service';
import { photoCleared } from './photos.service';
import { refuseFields } from '../../common/command';
import { LIVE_TEAM_TYPES, MODERATED_TYPES, notePartsFor, noteRefusal, storyKey, storyOwner } from '../../../shared/activities';
import type { ActivityType } from '../../../shared/schemas/agenda-item';
import type { SubmissionInput, SubmissionView } from '../../../shared/schemas/live';
import {
  guidedFieldsSchema,
  type ActivityBoard,
  type NoteView,
  type PhotoView,
  type PromotedOption,
  type TeamRef,
  type ThemeView,
} from '../../../shared/schemas/activities';

/** Who is looking at a board: the console (everything), the room (the projector and watchers), or one phone. */
export type Viewer = { kind: 'console' } | { kind: 'room' } | { kind: 'phone'; participantId: string };

/** Changes to one item within this window are announced together, so a room typing at once costs a few broadcasts. */
const CHANGE_TICK_MS = 250;
/** The announcer's keys of board changes start with this (a photo-consent change sends them all at once). */
const BOARD_KEY = 'board:';

/** Everything needed to show notes: people, photos and duplicates, read once per board. */
interface NoteContext {
  names: Map<string, string>;
  consent: Map<string, boolean>;
  photos: Map<string, PhotoRow>;
  duplicates: Map<string, number>;
}

/**
 * The activities of a live session beyond plain notes: each activity's rules for submissions, the
 * boards each screen sees (and their change announcements), the session's teams as boards show them,
 * and the storyboards' frame order. Moderation is moderation.service.ts; rounds are rounds.service.ts.
 * Writes go through the writer queue first; broadcasts follow the commit.
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
   * The rules each activity adds to a submission, run by the submissions service inside its write
   * transaction: parts must be the activity's, guided sentences complete, photos the sender's own,
   * feedback aimed at someone else's sketch or another team's prototype.
   */
  async checkSubmission(input: SubmissionInput, participant: ParticipantRow, transaction: Transaction): Promise<void> {
    const { AgendaItem, Submission, Team, Participant, Photo } = this.ctx.db.models;
    const item = await AgendaItem.findByPk(input.itemId, { transaction });
    if (!item) throw errors.notFound('activity');
    // A talk, a break or a vote takes no notes at all; every other activity only its own kinds.
    const refusal = noteRefusal(item.type as ActivityType, input.kind);
    if (refusal) throw errors.badRequest(refusal === 'note_not_taken' ? 'This activity takes no notes' : 'This activity takes other kinds of notes', because(refusal));
    if (!MODERATED_TYPES.has(item.type as ActivityType)) return;
    const type = item.type as ActivityType;
    const parts = notePartsFor(type, item.settings);
    // An activity with parts files every note under one (the phone always offers them); one without takes none.
    if ((parts.length > 0 && input.part === undefined) || (input.part !== undefined && !parts.some((p) => p.id === input.part))) {
      throw parts.length
        ? errors.badRequest(`File the note under one of: ${parts.map((p) => p.label).join(', ')}`, because('note_part_missing'))
        : errors.badRequest('This activity does not file notes under parts; send the note on its own', because('note_no_parts'));
    }
    const fields = input.fields ?? {};
    const only = (allowed: string[]) => {
      const extra = Object.keys(fields).filter((k) => !allowed.includes(k));
      if (extra.length) throw errors.badRequest(`This note cannot carry: ${extra.join(', ')}`, because('note_extra_fields'));
    };
    const ownPhoto = async () => {
      const photo = await Photo.findByPk(fields.photoId ?? '', { transaction });
      // The photo's submission carries the upload's own clientId, so each photo has one submission, its uploader's.
      if (!photo || photo.participantId !== participant.id || photo.clientId !== input.clientId || photo.itemId !== input.itemId) {
        throw errors.badRequest('Upload the photo first; a photo goes with the note it was uploaded for', because('note_photo_first'));
      }
    };

    switch (input.kind) {
      case 'point_of_view':
      case 'how_might_we': {
        const r = guidedFieldsSchema(input.kind).safeParse(fields);
        if (!r.success) refuseFields(r.error);
        return;
      }
      case 'sketch':
        if (type !== 'sketch') throw errors.badRequest('Sketch photos go to a sketch activity', because('photo_wrong_activity'));
        only(['photoId']);
        return ownPhoto();
      case 'frame':
        if (type !== 'storyboard') throw errors.badRequest('Frames go to a storyboard activity', because('photo_wrong_activity'));
        only(['photoId']);
        if (fields.photoId !== undefined) await ownPhoto();
        return;
      case 'feedback': {
        if (type === 'sketch') {
          only(['sketchId']);
          const sketch = await Submission.findByPk(fields.sketchId ?? '', { transaction });
          if (!sketch || sketch.kind !== 'sketch' || sketch.sessionId !== participant.sessionId || sketch.itemId !== input.itemId || sketch.hidden) {
            throw errors.badRequest('That sketch is not in this activity any more', because('sketch_gone'));
          }
          if (sketch.participantId === participant.id) throw errors.badRequest('Feedback is for the others’ sketches; yours gets theirs', because('feedback_own_sketch'));
          return;
        }
        if (type === 'test_rounds') {
          only(['hostTeamId', 'round']);
          if (input.part === undefined) throw errors.badRequest('File the feedback under one part of the grid', because('feedback_part_missing'));
          const host = await Team.findByPk(fields.hostTeamId ?? '', { transaction });
          if (!host || host.sessionId !== participant.sessionId || host.retiredAt) throw errors.badRequest('Choose the team whose prototype you tested', because('feedback_team_missing'));
          if (host.id === participant.teamId) throw errors.badRequest('Test another team’s prototype, not your own team’s', because('feedback_own_team'));
          if (fields.round !== undefined && !/^\d{1,2}$/.test(fields.round)) throw errors.badRequest('The round is a number', because('round_not_number'));
          return;
        }
        throw errors.badRequest('Feedback goes to a sketch or a test round', because('feedback_wrong_activity'));
      }
      default: {
        if (type === 'interview') {
          only(['partnerId', 'round']);
          if (fields.partnerId !== undefined) {
            const partner = await Participant.findByPk(fields.partnerId, { attributes: ['id', 'sessionId'], transaction });
            if (!partner || partner.sessionId !== participant.sessionId || partner.id === participant.id) {
              throw errors.badRequest('Notes are about your partner in this session', because('partner_not_here'));
            }
          }
          if (fields.round !== undefined && !/^\d{1,2}$/.test(fields.round)) throw errors.badRequest('The round is a number', because('round_not_number'));
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
    if (item.type !== 'storyboard') throw errors.badRequest('Only a storyboard has frames to put in order', because('storyboard_only'));
    if (new Set(frameIds).size !== frameIds.length) throw errors.badRequest('Each frame can be in the story once', because('frame_once'));
    const { Submission } = this.ctx.db.models;
    const order = await this.ctx.db.writeTx(async (transaction) => {
      const frames = (await Submission.findAll({ where: { sessionId, itemId, kind: 'frame' }, order: [['createdAt', 'ASC']], transaction })).filter(
        (f) => storyKey(f) === key && !f.mergedIntoId,
      );
      const known = new Set(frames.map((f) => f.id));
      if (frameIds.some((id) => !known.has(id))) throw errors.badRequest('Those frames are not all in this storyboard', because('frames_unknown'));
      const full = [...frameIds, ...frames.map((f) => f.id).filter((id) => !frameIds.includes(id))];
      const state = await this.stateOf(sessionId, item.id, transaction);
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
    if (!item) throw errors.notFound('item');
    return item;
  }

  /** Announces that an item's board changed, to the console and the room (and more rooms when given), a few times a second at most. */
  changed(sessionId: string, itemId: string, rooms: string[] = [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId)]): void {
    // The rooms of the changes that waited go in one send, which reaches each socket once.
    this.ctx.announcer.announceSoon(`${BOARD_KEY}${sessionId}|${itemId}`, rooms, 'activity:changed', { itemId }, { afterMs: CHANGE_TICK_MS, what: 'a board change' });
  }

  /** Every room of the session: the console, the projector and watchers, and the phones. */
  everyone(sessionId: string): string[] {
    return [liveRooms.facilitators(sessionId), liveRooms.screens(sessionId), liveRooms.session(sessionId)];
  }

  /** An item's activity state (its round, pairs and frame orders) as stored, or a new one not yet saved. */
  async stateOf(sessionId: string, itemId: string, transaction: Transaction): Promise<ActivityStateRow> {
    const { ActivityState } = this.ctx.db.models;
    const state = await ActivityState.findOne({ where: { sessionId, itemId }, transaction });
    return state ?? ActivityState.build({ id: crypto.randomUUID(), sessionId, itemId, round: 0, roster: null, frameOrders: {} });
  }

  /**
   * Notes as a viewer sees them. `all` (the item's every row) counts the duplicates; without it
   * they are read. A photo is blurred unless cleared, except on its uploader's own phone.
   */
  async notesFor(sessionId: string, rows: SubmissionRow[], viewer: Viewer, all?: SubmissionRow[]): Promise<NoteView[]> {
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

/** An affinity theme as the screens see it. */
export function toTheme(t: { id: string; name: string; position: number }): ThemeView {
  return { id: t.id, name: t.name, position: t.position };
}

/** A promoted note or theme as the console sees it. */
export function toPromoted(p: { id: string; text: string; sourceKind: 'note' | 'theme'; sourceId: string; itemId: string }): PromotedOption {
  return { id: p.id, text: p.text, sourceKind: p.sourceKind, sourceId: p.sourceId, itemId: p.itemId };
}
