import crypto from 'node:crypto';
import fs from 'node:fs/promises';
import path from 'node:path';
import { Op, type Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import { because, errors } from '../../common/errors';
import { anonymousName } from './results.service';
import type { MyData, RetentionStatus } from '../../../shared/schemas/results';

/** Device ids of participants whose personal data is deleted start with this, so they are never counted as named again. */
export const ERASED_DEVICE_PREFIX = 'erased-';

/** How often the server looks for workshops whose personal data is due for deletion. */
export const RETENTION_SWEEP_MS = 60 * 60_000;

/** A day in milliseconds. */
const DAY_MS = 86_400_000;

/**
 * Where a feature keeps photos (or other files that show people) of a workshop's live sessions:
 * counted for the retention status and erased with the names. Features add theirs to {@link PHOTO_KEEPERS}.
 */
export interface PhotoKeeper {
  /** How many photos the sessions still hold (only one participant's when `participantId` is given). */
  count(ctx: AppContext, sessionIds: string[], participantId?: string): Promise<number>;
  /**
   * Deletes the photos' rows inside the transaction (only one participant's when `participantId` is
   * given) and returns the files to remove from disk after the commit.
   */
  erase(ctx: AppContext, sessionIds: string[], transaction: Transaction, participantId?: string): Promise<string[]>;
}

/**
 * The photos of sketches and storyboards (server/features/activities): rows in `photos`, files in the
 * upload folder named after the photo's random storage key (the full picture, its thumbnail and blurred copy).
 */
export const activityPhotos: PhotoKeeper = {
  count: (ctx, sessionIds, participantId) =>
    ctx.db.models.Photo.count({ where: participantId === undefined ? { sessionId: sessionIds } : { sessionId: sessionIds, participantId } }),
  async erase(ctx, sessionIds, transaction, participantId) {
    const where = participantId === undefined ? { sessionId: sessionIds } : { sessionId: sessionIds, participantId };
    const rows = await ctx.db.models.Photo.findAll({ where, attributes: ['id', 'storageKey'], transaction });
    if (rows.length === 0) return [];
    await ctx.db.models.Photo.destroy({ where: { id: rows.map((r) => r.id) }, transaction });
    const keys = rows.map((r) => r.storageKey).filter((k) => /^[0-9a-f]{16,64}$/.test(k));
    const names = await fs.readdir(ctx.config.uploadDir).catch(() => [] as string[]);
    // Every copy of a photo starts with its storage key, whatever the activities feature calls the copies.
    return names.filter((name) => keys.some((k) => name.startsWith(`${k}.`))).map((name) => path.join(ctx.config.uploadDir, name));
  },
};

/** The features that keep photos of people. */
export const PHOTO_KEEPERS: PhotoKeeper[] = [activityPhotos];

/**
 * Retention of a workshop's personal data: deleting names, photos and addresses now or a set number
 * of days after the last live session ended (a timer checks periodically), while anonymous tallies
 * and notes stay; and what a participant may do about their own data from the phone.
 */
export class RetentionService {
  private timer: NodeJS.Timeout | null = null;
  private running: Promise<unknown> | null = null;
  private stopped = false;

  constructor(private ctx: AppContext) {}

  /** What personal data a workshop still holds and when it goes. */
  async status(workshopId: string): Promise<RetentionStatus> {
    const { Workshop, LiveSession, Participant } = this.ctx.db.models;
    const w = await Workshop.findByPk(workshopId);
    if (!w) throw errors.notFound('workshop');
    const sessions = await LiveSession.findAll({ where: { workshopId }, attributes: ['id', 'status', 'endedAt'] });
    const sessionIds = sessions.map((s) => s.id);
    const liveNow = sessions.some((s) => s.status === 'live');
    const lastEnd = Math.max(0, ...sessions.map((s) => s.endedAt?.getTime() ?? 0));
    const named = { sessionId: sessionIds, deviceId: { [Op.notLike]: `${ERASED_DEVICE_PREFIX}%` } };
    const [names, addresses, photos] = await Promise.all([
      Participant.count({ where: named }),
      Participant.count({ where: { sessionId: sessionIds, email: { [Op.ne]: null } } }),
      this.photoCount(sessionIds),
    ]);
    return {
      retentionDays: w.retentionDays ?? null,
      // Nothing is due once the data was deleted after the last session ended (a later session brings a new date).
      dueAt:
        w.retentionDays === null || w.retentionDays === undefined || lastEnd === 0 || (w.personalDataDeletedAt?.getTime() ?? 0) >= lastEnd
          ? null
          : lastEnd + w.retentionDays * DAY_MS,
      personalDataDeletedAt: w.personalDataDeletedAt?.getTime() ?? null,
      liveNow,
      held: { names, addresses, photos },
    };
  }

  /** Sets the days after the last live session ended at which personal data is deleted (`null`: keep until deleted by hand). */
  async setDays(workshopId: string, retentionDays: number | null): Promise<RetentionStatus> {
    await this.ctx.db.writeTx(async (transaction) => {
      const n = await this.ctx.db.models.Workshop.update({ retentionDays }, { where: { id: workshopId }, transaction });
      if (n[0] === 0) throw errors.notFound('workshop');
    });
    return this.status(workshopId);
  }

  /**
   * Deletes a workshop's personal data now: every participant becomes "Participant N" (numbered in
   * order of joining, as the results number them), addresses and device ids go, photos leave the
   * database and the disk, and so do invitations already accepted or expired. Notes, teams and tallies stay, anonymous. Refused while a session is live.
   */
  async deleteNow(workshopId: string, now = Date.now()): Promise<RetentionStatus> {
    const { Workshop, LiveSession, Participant, Invitation } = this.ctx.db.models;
    const files = await this.ctx.db.writeTx(async (transaction) => {
      const w = await Workshop.findByPk(workshopId, { transaction });
      if (!w) throw errors.notFound('workshop');
      const sessions = await LiveSession.findAll({ where: { workshopId }, order: [['startedAt', 'ASC']], transaction });
      if (sessions.some((s) => s.status === 'live')) {
        throw errors.conflict('A live session is running; end it first, then delete the personal data', because('live_session_running'));
      }
      const sessionIds = sessions.map((s) => s.id);
      const order = new Map(sessionIds.map((id, i) => [id, i]));
      const people = await Participant.findAll({ where: { sessionId: sessionIds }, transaction });
      people.sort(
        (a, b) => order.get(a.sessionId)! - order.get(b.sessionId)! || a.joinedAt.getTime() - b.joinedAt.getTime() || a.id.localeCompare(b.id),
      );
      for (const [i, p] of people.entries()) {
        if (p.deviceId.startsWith(ERASED_DEVICE_PREFIX) && p.email === null) continue;
        p.set({ displayName: anonymousName(i + 1), email: null, deviceId: `${ERASED_DEVICE_PREFIX}${crypto.randomUUID()}` });
        await p.save({ transaction });
      }
      const toRemove: string[] = [];
      for (const keeper of PHOTO_KEEPERS) toRemove.push(...(await keeper.erase(this.ctx, sessionIds, transaction)));
      // Invitations that were accepted or ran out hold an address for nothing; pending ones still wait for an answer.
      await Invitation.destroy({ where: { workshopId, [Op.or]: [{ acceptedAt: { [Op.ne]: null } }, { expiresAt: { [Op.lt]: new Date(now) } }] }, transaction });
      w.set({ personalDataDeletedAt: new Date(now) });
      await w.save({ transaction });
      return toRemove;
    });
    await this.removeFiles(files);
    // The rows are changed, but older copies of them stay in the write-ahead log and in free pages until scrubbed.
    await this.ctx.db.scrub();
    this.ctx.logger.info({ workshopId, photos: files.length }, 'deleted the personal data of a workshop');
    return this.status(workshopId);
  }

  /** Deletes the personal data of every workshop whose retention time has passed; returns their ids. */
  async sweep(now = Date.now()): Promise<string[]> {
    const due = await this.ctx.db.models.Workshop.findAll({ where: { retentionDays: { [Op.ne]: null } }, attributes: ['id'] });
    const done: string[] = [];
    for (const { id } of due) {
      if (this.stopped) break;
      const s = await this.status(id);
      const held = s.held.names + s.held.addresses + s.held.photos;
      if (s.liveNow || s.dueAt === null || s.dueAt > now || held === 0) continue;
      await this.deleteNow(id, now);
      done.push(id);
    }
    return done;
  }

  /** Starts the periodic check (first soon after start-up, then every `intervalMs`). */
  start(intervalMs = RETENTION_SWEEP_MS, firstAfterMs = 5_000): void {
    this.stopped = false;
    const run = (delay: number) => {
      this.timer = setTimeout(() => {
        this.running = this.sweep()
          .catch((err: unknown) => this.ctx.logger.error({ err }, 'the retention check failed'))
          .finally(() => {
            this.running = null;
            if (!this.stopped) run(intervalMs);
          });
      }, delay);
      // The check never keeps the process alive on its own.
      this.timer.unref();
    };
    run(firstAfterMs);
  }

  /** Stops the periodic check and waits for a check in progress. */
  async stop(): Promise<void> {
    this.stopped = true;
    if (this.timer) clearTimeout(this.timer);
    this.timer = null;
    await this.running;
  }

  /** What a participant's phone may see of what Cairn keeps about them. */
  async myData(participantId: string, sessionId: string): Promise<MyData> {
    const p = await this.participant(participantId, sessionId);
    const notes = await this.ctx.db.models.Submission.count({ where: { participantId, sessionId } });
    const session = await this.ctx.db.models.LiveSession.findByPk(sessionId, { attributes: ['workshopId'] });
    const w = session ? await this.ctx.db.models.Workshop.findByPk(session.workshopId, { attributes: ['retentionDays'] }) : null;
    return { displayName: p.displayName, photoConsent: p.photoConsent, email: p.email, notes, retentionDays: w?.retentionDays ?? null };
  }

  /** A participant leaves an address to get the report by e-mail, or takes it back with `null`. */
  async setReportEmail(participantId: string, sessionId: string, email: string | null): Promise<MyData> {
    await this.ctx.db.writeTx(async (transaction) => {
      const p = await this.ctx.db.models.Participant.findByPk(participantId, { transaction });
      if (!p || p.sessionId !== sessionId) throw errors.notInSession();
      // After "delete personal data" a participant's token still works for a while: it must not bring an address back.
      if (email !== null && p.deviceId.startsWith(ERASED_DEVICE_PREFIX)) {
        throw errors.conflict("This workshop's personal data has been deleted; Cairn keeps no addresses for it any more", because('data_deleted'));
      }
      p.email = email;
      await p.save({ transaction });
    });
    return this.myData(participantId, sessionId);
  }

  /**
   * Deletes every note a participant wrote in the session and every photo they took (rows and files),
   * at their request; answers how many of each went.
   */
  async removeMyNotes(participantId: string, sessionId: string): Promise<{ removed: number; photos: number }> {
    let photos = 0;
    for (const keeper of PHOTO_KEEPERS) photos += await keeper.count(this.ctx, [sessionId], participantId);
    const { removed, files } = await this.ctx.db.writeTx(async (transaction) => {
      const p = await this.ctx.db.models.Participant.findByPk(participantId, { transaction });
      if (!p || p.sessionId !== sessionId) throw errors.notInSession();
      const count = await this.ctx.db.models.Submission.destroy({ where: { participantId, sessionId }, transaction });
      const gone: string[] = [];
      for (const keeper of PHOTO_KEEPERS) gone.push(...(await keeper.erase(this.ctx, [sessionId], transaction, participantId)));
      return { removed: count, files: gone };
    });
    await this.removeFiles(files);
    this.afterRemoval?.(sessionId);
    return { removed, photos };
  }

  /** Called after a participant removed their contributions, so the live screens can read their boards again. */
  afterRemoval: ((sessionId: string) => void) | null = null;

  /** Removes photo files after a commit: a file that cannot be removed now is logged, never left referenced by the database. */
  private async removeFiles(files: string[]): Promise<void> {
    for (const file of files) {
      await fs.rm(file, { force: true }).catch((err: unknown) => this.ctx.logger.error({ err, file }, 'could not remove a photo file'));
    }
  }

  private async participant(participantId: string, sessionId: string) {
    const p = await this.ctx.db.models.Participant.findByPk(participantId);
    if (!p || p.sessionId !== sessionId) throw errors.notInSession();
    return p;
  }

  private async photoCount(sessionIds: string[]): Promise<number> {
    let n = 0;
    for (const keeper of PHOTO_KEEPERS) n += await keeper.count(this.ctx, sessionIds);
    return n;
  }
}
