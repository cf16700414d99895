import type { SocketCommands } from '../../common/command';
import type { ActivitiesService } from './activities.service';

/**
 * Activity commands: every screen reads boards, rounds and promotions (a phone sees its own view);
 * the facilitators moderate and run rounds; a phone orders its team's storyboard.
 */
export function registerActivitiesSocket(commands: SocketCommands, activities: ActivitiesService): void {
  commands.add('activity:board', ({ who, payload }) =>
    activities.board(who.sessionId, payload.itemId, who.participantId ? { kind: 'phone', participantId: who.participantId } : { kind: 'room' }),
  );
  commands.add('notes:list', ({ who, payload }) => activities.board(who.sessionId, payload.itemId, { kind: 'console' }));
  commands.add('notes:hide', ({ who, payload }) => activities.hide(who.sessionId, payload.noteIds, payload.hidden));
  commands.add('notes:merge', ({ who, payload }) => activities.merge(who.sessionId, payload.keepId, payload.duplicateIds));
  commands.add('notes:unmerge', ({ who, payload }) => activities.unmerge(who.sessionId, payload.noteId));
  commands.add('notes:promote', ({ who, payload }) => activities.promote(who.sessionId, payload.sourceKind, payload.sourceId));
  commands.add('notes:unpromote', ({ who, payload }) => activities.unpromote(who.sessionId, payload.promotionId));
  commands.add('notes:promoted', ({ who, payload }) => activities.promoted(who.sessionId, payload.itemId));
  commands.add('themes:create', ({ who, payload }) => activities.createTheme(who.sessionId, payload.itemId, payload.name, payload.noteIds));
  commands.add('themes:apply', ({ who, payload }) => activities.applyThemes(who.sessionId, payload.itemId, payload.groups));
  commands.add('themes:rename', ({ who, payload }) => activities.renameTheme(who.sessionId, payload.themeId, payload.name));
  commands.add('themes:delete', ({ who, payload }) => activities.deleteTheme(who.sessionId, payload.themeId));
  commands.add('themes:assign', ({ who, payload }) => activities.assignTheme(who.sessionId, payload.themeId, payload.noteIds));
  commands.add('rounds:get', ({ who, payload }) => activities.round(who.sessionId, payload.itemId));
  commands.add('rounds:set', ({ who, payload }) => activities.setRound(who.sessionId, payload.itemId, payload.round, payload.regroup ?? false));
  commands.add('storyboard:reorder', ({ who, payload }) => activities.reorderFrames(who.sessionId, who.participantId!, payload.itemId, payload.frameIds));
  commands.add('storyboard:arrange', ({ who, payload }) => activities.arrangeFrames(who.sessionId, payload.itemId, payload.storyKey, payload.frameIds));
}
