import type { AppContext } from '../../context';
import { errors } from '../../common/errors';
import type { VoteSources } from '../../../shared/schemas/voting';

/** Earlier notes offered as options, newest first: enough for a day's wall, small enough for one answer. */
const SOURCE_NOTES_LIMIT = 300;
/** Submission kinds worth promoting to a vote option. */
const PROMOTABLE_KINDS = ['note', 'how_might_we', 'point_of_view', 'reflection', 'feedback'];

/**
 * Where a vote's options can come from, as the console's vote set-up offers them: the notes and themes
 * the facilitators promoted, the session's earlier notes, and the options earlier votes chose. It only
 * reads; setting a vote up is voting.service.ts.
 */
export class VoteSourcesService {
  constructor(private ctx: AppContext) {}

  /** What the facilitator may turn into options: earlier notes of the session and the options earlier votes carried forward. */
  async list(sessionId: string): Promise<VoteSources> {
    const { Submission, Vote, AgendaItem, LiveSession, Promotion } = this.ctx.db.models;
    const session = await LiveSession.findByPk(sessionId, { attributes: ['id', 'workshopId'] });
    if (!session) throw errors.notFound('live_session');
    const [promotions, notes, votes, items] = await Promise.all([
      Promotion.findAll({ where: { sessionId }, order: [['position', 'ASC']] }),
      Submission.findAll({
        where: { sessionId, hidden: false, kind: PROMOTABLE_KINDS },
        order: [['createdAt', 'DESC']],
        limit: SOURCE_NOTES_LIMIT,
        attributes: ['id', 'itemId', 'kind', 'text'],
      }),
      Vote.findAll({ where: { sessionId }, order: [['createdAt', 'ASC']] }),
      AgendaItem.findAll({ where: { workshopId: session.workshopId }, attributes: ['id', 'title'] }),
    ]);
    const title = new Map(items.map((i) => [i.id, i.title]));
    const promotedNotes = new Set(promotions.filter((p) => p.sourceKind === 'note').map((p) => p.sourceId));
    // A promoted note that was hidden since is not offered; themes are offered by their name as promoted.
    const hidden = new Set(
      promotedNotes.size
        ? (await Submission.findAll({ where: { sessionId, id: [...promotedNotes], hidden: true }, attributes: ['id'] })).map((n) => n.id)
        : [],
    );
    return {
      promoted: promotions
        .filter((p) => !(p.sourceKind === 'note' && hidden.has(p.sourceId)))
        .map((p) => ({
          promotionId: p.id,
          sourceKind: p.sourceKind,
          submissionId: p.sourceKind === 'note' ? p.sourceId : null,
          itemId: p.itemId,
          itemTitle: title.get(p.itemId) ?? '',
          text: p.text,
        })),
      notes: notes.map((n) => ({
        submissionId: n.id,
        itemId: n.itemId,
        itemTitle: title.get(n.itemId) ?? '',
        kind: n.kind,
        text: n.text,
        promoted: promotedNotes.has(n.id),
      })),
      winners: votes
        .filter((v) => v.chosen && v.chosen.length > 0)
        .map((v) => ({
          itemId: v.itemId,
          itemTitle: title.get(v.itemId) ?? '',
          texts: v.chosen!.map((id) => v.options.find((o) => o.id === id)?.text ?? '').filter(Boolean),
        })),
    };
  }
}
