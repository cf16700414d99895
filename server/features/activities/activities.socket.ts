import type { LiveCommands } from '../live/live.socket';
import type { ActivitiesService } from './activities.service';
import { ActivityPayloads as P } from '../../../shared/schemas/activities';

/**
 * Activity commands on a live socket: every screen reads boards, rounds and promotions (a phone
 * sees its own view); the facilitators moderate and run rounds; a phone orders its team's storyboard.
 */
export function registerActivitiesSocket({ on, parse }: LiveCommands, activities: ActivitiesService): void {
  on('activity:board', async (payload, who) => {
    const { itemId } = parse(P.item, payload);
    return activities.board(who.sessionId, itemId, who.participantId ? { kind: 'phone', participantId: who.participantId } : { kind: 'room' });
  });
  on('notes:list', async (payload, who) => activities.board(who.sessionId, parse(P.item, payload).itemId, { kind: 'console' }));
  on('notes:hide', async (payload, who) => {
    const { noteIds, hidden } = parse(P.hide, payload);
    return activities.hide(who.sessionId, noteIds, hidden);
  });
  on('notes:merge', async (payload, who) => {
    const { keepId, duplicateIds } = parse(P.merge, payload);
    return activities.merge(who.sessionId, keepId, duplicateIds);
  });
  on('notes:unmerge', async (payload, who) => activities.unmerge(who.sessionId, parse(P.unmerge, payload).noteId));
  on('notes:promote', async (payload, who) => {
    const { sourceKind, sourceId } = parse(P.promote, payload);
    return activities.promote(who.sessionId, sourceKind, sourceId);
  });
  on('notes:unpromote', async (payload, who) => activities.unpromote(who.sessionId, parse(P.unpromote, payload).promotionId));
  on('notes:promoted', async (payload, who) => activities.promoted(who.sessionId, parse(P.promoted, payload ?? {}).itemId));
  on('themes:create', async (payload, who) => {
    const { itemId, name, noteIds } = parse(P.themeCreate, payload);
    return activities.createTheme(who.sessionId, itemId, name, noteIds);
  });
  on('themes:apply', async (payload, who) => {
    const { itemId, groups } = parse(P.themeApply, payload);
    return activities.applyThemes(who.sessionId, itemId, groups);
  });
  on('themes:rename', async (payload, who) => {
    const { themeId, name } = parse(P.themeRename, payload);
    return activities.renameTheme(who.sessionId, themeId, name);
  });
  on('themes:delete', async (payload, who) => activities.deleteTheme(who.sessionId, parse(P.themeDelete, payload).themeId));
  on('themes:assign', async (payload, who) => {
    const { themeId, noteIds } = parse(P.themeAssign, payload);
    return activities.assignTheme(who.sessionId, themeId, noteIds);
  });
  on('rounds:get', async (payload, who) => activities.round(who.sessionId, parse(P.item, payload).itemId));
  on('rounds:set', async (payload, who) => {
    const { itemId, round, regroup } = parse(P.roundSet, payload);
    return activities.setRound(who.sessionId, itemId, round, regroup ?? false);
  });
  on('storyboard:reorder', async (payload, who) => {
    const { itemId, frameIds } = parse(P.reorder, payload);
    return activities.reorderFrames(who.sessionId, who.participantId!, itemId, frameIds);
  });
  on('storyboard:arrange', async (payload, who) => {
    const { itemId, storyKey, frameIds } = parse(P.arrange, payload);
    return activities.arrangeFrames(who.sessionId, itemId, storyKey, frameIds);
  });
}
