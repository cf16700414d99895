import fs from 'node:fs/promises';
import { QueryTypes } from 'sequelize';
import type { AppContext } from '../../context';
import { because, errors } from '../../common/errors';
import { PHOTO_KEEPERS } from '../results/retention.service';
import type { SessionKind, SessionSummary } from '../../../shared/schemas/live';

/**
 * A workshop's live sessions after (or while) they ran: listing them with what each holds, marking
 * one as a rehearsal or the day, and discarding one with everything the room put into it.
 */
export class SessionsService {
  constructor(private ctx: AppContext) {}

  /** The workshop's sessions, oldest first, with how many joined, the notes and the ballots of each. */
  async list(workshopId: string): Promise<SessionSummary[]> {
    const rows = await this.ctx.db.models.LiveSession.findAll({ where: { workshopId }, order: [['startedAt', 'ASC']] });
    if (rows.length === 0) return [];
    const ids = rows.map((r) => r.id);
    const marks = ids.map(() => '?').join(',');
    const count = (sql: string) =>
      this.ctx.db.sequelize
        .query<{ sessionId: string; n: number }>(sql, { replacements: ids, type: QueryTypes.SELECT })
        .then((found) => new Map(found.map((f) => [f.sessionId, Number(f.n)])));
    const [joined, notes, dots, rankings] = await Promise.all([
      count(`SELECT sessionId, COUNT(*) AS n FROM participants WHERE sessionId IN (${marks}) GROUP BY sessionId`),
      count(`SELECT sessionId, COUNT(*) AS n FROM submissions WHERE sessionId IN (${marks}) GROUP BY sessionId`),
      // A ballot is one voter's dots in one vote, however many dots it holds.
      count(
        `SELECT v.sessionId AS sessionId, COUNT(DISTINCT d.voteId || ':' || d.participantId) AS n FROM vote_dots d JOIN votes v ON v.id = d.voteId WHERE d.count > 0 AND v.sessionId IN (${marks}) GROUP BY v.sessionId`,
      ),
      count(`SELECT v.sessionId AS sessionId, COUNT(*) AS n FROM vote_rankings r JOIN votes v ON v.id = r.voteId WHERE v.sessionId IN (${marks}) GROUP BY v.sessionId`),
    ]);
    return rows.map((r) => ({
      id: r.id,
      kind: r.kind ?? 'day',
      status: r.status,
      startedAt: r.startedAt.getTime(),
      endedAt: r.endedAt?.getTime() ?? null,
      joined: joined.get(r.id) ?? 0,
      notes: notes.get(r.id) ?? 0,
      votes: (dots.get(r.id) ?? 0) + (rankings.get(r.id) ?? 0),
    }));
  }

  /** Marks a session as a rehearsal or the day. */
  async setKind(workshopId: string, sessionId: string, kind: SessionKind): Promise<SessionSummary> {
    await this.ctx.db.writeTx(async (transaction) => {
      const row = await this.ctx.db.models.LiveSession.findByPk(sessionId, { transaction });
      if (!row || row.workshopId !== workshopId) throw errors.notFound('session');
      row.kind = kind;
      await row.save({ transaction });
    });
    return (await this.list(workshopId)).find((s) => s.id === sessionId)!;
  }

  /**
   * Deletes an ended session with its participants, notes, photos (rows and files), teams, themes
   * and votes. A session still live is refused: end it first.
   */
  async discard(workshopId: string, sessionId: string): Promise<void> {
    const files = await this.ctx.db.writeTx(async (transaction) => {
      const row = await this.ctx.db.models.LiveSession.findByPk(sessionId, { transaction });
      if (!row || row.workshopId !== workshopId) throw errors.notFound('session');
      if (row.status === 'live') throw errors.conflict('This session is still live; end it before discarding it', because('session_still_live'));
      const toRemove: string[] = [];
      for (const keeper of PHOTO_KEEPERS) toRemove.push(...(await keeper.erase(this.ctx, [sessionId], transaction)));
      // Participants, notes, teams, themes, promotions, activity states and votes go with the session (ON DELETE CASCADE).
      await row.destroy({ transaction });
      return toRemove;
    });
    // After the commit, so no row ever points at a missing file.
    await Promise.all(files.map((f) => fs.rm(f, { force: true }).catch(() => undefined)));
  }
}
