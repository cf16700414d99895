import crypto from 'node:crypto';
import { UniqueConstraintError, type Transaction } from 'sequelize';
import type { AppContext } from '../../context';
import type { ParticipantRow, SubmissionRow } from '../../db/models';
import { errors } from '../../common/errors';
import { liveRooms, type LiveService } from './live.service';
import type { SubmissionInput, SubmissionView } from '../../../shared/schemas/live';

/** A stored submission as facilitators see it. */
function toSubmissionView(row: SubmissionRow, displayName: string): SubmissionView {
  return {
    id: row.id,
    itemId: row.itemId,
    participantId: row.participantId,
    displayName,
    teamId: row.teamId,
    kind: row.kind,
    part: row.part,
    text: row.text,
    fields: row.fields,
    hidden: row.hidden,
    createdAt: row.createdAt.getTime(),
  };
}

/**
 * A rule an activity adds to submissions (e.g. a note's quadrant must be one of the map's): it runs
 * inside the write transaction once the general checks passed, and throws an AppError to refuse.
 */
export type SubmissionCheck = (input: SubmissionInput, participant: ParticipantRow, transaction: Transaction) => Promise<void>;

/**
 * What the phones put into a live session (notes, and the notes photos come with): taken in exactly once
 * per client id through the one input gate and every activity's own checks, stored, and announced to the
 * facilitators after the commit; and listed for the console.
 */
export class SubmissionsService {
  private submissionChecks: SubmissionCheck[] = [];
  private submissionListeners: ((submission: SubmissionView) => void)[] = [];

  constructor(
    private ctx: AppContext,
    private live: LiveService,
  ) {}

  /** Adds an activity's rule that every new submission must also pass. */
  addSubmissionCheck(check: SubmissionCheck): void {
    this.submissionChecks.push(check);
  }

  /** Calls `listener` with every new submission after its commit (activities that tell more rooms than the facilitators). */
  onSubmissionCreated(listener: (submission: SubmissionView) => void): void {
    this.submissionListeners.push(listener);
  }

  /**
   * Stores a participant's submission to the current item, exactly once per `clientId`: a retry
   * answers with the first submission's id and `duplicate: true`.
   */
  async create(participantId: string, sessionId: string, input: SubmissionInput): Promise<{ id: string; duplicate: boolean }> {
    const { Participant, Submission } = this.ctx.db.models;
    let created: { row: SubmissionRow; displayName: string } | null = null;
    const answer = await this.ctx.db
      .writeTx(async (transaction) => {
        const p = await Participant.findByPk(participantId, { transaction });
        if (!p || p.sessionId !== sessionId) throw errors.notInSession();
        // A retry of something already stored is answered before the checks, which may have changed since.
        const first = await Submission.findOne({ where: { participantId, clientId: input.clientId }, attributes: ['id'], transaction });
        if (first) return { id: first.id, duplicate: true };
        const refused = await this.live.gate(sessionId, true, input.itemId);
        if (refused) throw refused;
        for (const check of this.submissionChecks) await check(input, p, transaction);
        const row = await Submission.create(
          {
            id: crypto.randomUUID(),
            sessionId,
            itemId: input.itemId,
            participantId,
            clientId: input.clientId,
            kind: input.kind,
            part: input.part ?? null,
            text: input.text,
            fields: input.fields ?? null,
            teamId: p.teamId,
            themeId: null,
            createdAt: new Date(),
          },
          { transaction },
        );
        created = { row, displayName: p.displayName };
        return { id: row.id, duplicate: false };
      })
      .catch(async (err: unknown) => {
        // The unique (participantId, clientId) index is the last word if two copies ever race past the lookup.
        if (!(err instanceof UniqueConstraintError)) throw err;
        const first = await Submission.findOne({ where: { participantId, clientId: input.clientId }, attributes: ['id'] });
        if (!first) throw err;
        return { id: first.id, duplicate: true };
      });
    const made = created as { row: SubmissionRow; displayName: string } | null;
    if (made) {
      const view = toSubmissionView(made.row, made.displayName);
      this.ctx.announcer.announce(liveRooms.facilitators(sessionId), 'submission:created', view);
      for (const listener of this.submissionListeners) listener(view);
    }
    return answer;
  }

  /** The submissions to one agenda item of a session so far, oldest first (hidden ones included and marked). */
  async list(sessionId: string, itemId: string): Promise<SubmissionView[]> {
    const { Submission, Participant } = this.ctx.db.models;
    const rows = await Submission.findAll({ where: { sessionId, itemId }, order: [['createdAt', 'ASC']] });
    const people = await Participant.findAll({
      where: { id: [...new Set(rows.map((r) => r.participantId))] },
      attributes: ['id', 'displayName'],
    });
    const names = new Map(people.map((p) => [p.id, p.displayName]));
    return rows.map((r) => toSubmissionView(r, names.get(r.participantId) ?? ''));
  }
}
