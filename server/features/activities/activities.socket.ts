import type { SocketCommands } from '../../common/command';
import type { ActivitiesService } from './activities.service';
import type { ModerationService } from './moderation.service';
import type { RoundsService } from './rounds.service';

/**
 * Activity commands: every screen reads boards, rounds and promotions (a phone sees its own view);
 * the facilitators moderate and run rounds; a phone orders its team's storyboard.
 */
export function registerActivitiesSocket(
  commands: SocketCommands,
  { activities, moderation, rounds }: { activities: ActivitiesService; moderation: ModerationService; rounds: RoundsService },
): void {
  commands.add('activity:board', ({ who, payload }) =>
    activities.board(who.sessionId, payload.itemId, who.participantId ? { kind: 'phone', participantId: who.participantId } : { kind: 'room' }),
  );
  commands.add('notes:list', ({ who, payload }) => activities.board(who.sessionId, payload.itemId, { kind: 'console' }));
  commands.add('notes:hide', ({ who, payload }) => moderation.hide(who.sessionId, payload.noteIds, payload.hidden));
  commands.add('notes:merge', ({ who, payload }) => moderation.merge(who.sessionId, payload.keepId, payload.duplicateIds));
  commands.add('notes:unmerge', ({ who, payload }) => moderation.unmerge(who.sessionId, payload.noteId));
  commands.add('notes:promote', ({ who, payload }) => moderation.promote(who.sessionId, payload.sourceKind, payload.sourceId));
  commands.add('notes:unpromote', ({ who, payload }) => moderation.unpromote(who.sessionId, payload.promotionId));
  commands.add('notes:promoted', ({ who, payload }) => moderation.promoted(who.sessionId, payload.itemId));
  commands.add('themes:create', ({ who, payload }) => moderation.createTheme(who.sessionId, payload.itemId, payload.name, payload.noteIds));
  commands.add('themes:apply', ({ who, payload }) => moderation.applyThemes(who.sessionId, payload.itemId, payload.groups));
  commands.add('themes:rename', ({ who, payload }) => moderation.renameTheme(who.sessionId, payload.themeId, payload.name));
  commands.add('themes:delete', ({ who, payload }) => moderation.deleteTheme(who.sessionId, payload.themeId));
  commands.add('themes:assign', ({ who, payload }) => moderation.assignTheme(who.sessionId, payload.themeId, payload.noteIds));
  commands.add('rounds:get', ({ who, payload }) => rounds.round(who.sessionId, payload.itemId));
  commands.add('rounds:set', ({ who, payload }) => rounds.setRound(who.sessionId, payload.itemId, payload.round, payload.regroup ?? false));
  commands.add('storyboard:reorder', ({ who, payload }) => activities.reorderFrames(who.sessionId, who.participantId!, payload.itemId, payload.frameIds));
  commands.add('storyboard:arrange', ({ who, payload }) => activities.arrangeFrames(who.sessionId, payload.itemId, payload.storyKey, payload.frameIds));
}
